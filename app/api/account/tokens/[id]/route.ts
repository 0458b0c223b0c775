import { handle, parseId } from '@/lib/http';
import { getCaller } from '@/lib/auth';
import { revokeToken } from '@/lib/data/account';

type Ctx = { params: Promise<{ id: string }> };

export const DELETE = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await getCaller(req);
  return Response.json(await revokeToken({ caller, id: parseId(id, 'API token') }));
});
