import { handle, parseId } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { getOutboxMessage } from '@/lib/data/outbox';

type Ctx = { params: Promise<{ id: string }> };

export const GET = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'outbox.read');
  return Response.json(await getOutboxMessage({ caller, id: parseId(id, 'message') }));
});
