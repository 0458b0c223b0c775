import { handle, readJson } from '@/lib/http';
import { getCaller } from '@/lib/auth';
import { changePassword } from '@/lib/data/account';
import { passwordChangeSchema } from '@/lib/validations/account';

export const POST = handle(async (req) => {
  const caller = await getCaller(req);
  const input = passwordChangeSchema.parse(await readJson(req));
  await changePassword({ caller, input });
  return new Response(null, { status: 204 });
});
