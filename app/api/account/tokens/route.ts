import { handle, readJson } from '@/lib/http';
import { getCaller } from '@/lib/auth';
import { createToken, listTokens } from '@/lib/data/account';
import { tokenCreateSchema } from '@/lib/validations/account';

export const GET = handle(async (req) => {
  const caller = await getCaller(req);
  return Response.json({ items: await listTokens({ caller }) });
});

/** 201 {token, record}: the token secret appears in this answer only. */
export const POST = handle(async (req) => {
  const caller = await getCaller(req);
  const input = tokenCreateSchema.parse(await readJson(req));
  return Response.json(await createToken({ caller, input }), { status: 201 });
});
