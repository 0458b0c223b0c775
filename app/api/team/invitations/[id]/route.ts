import { handle, parseId } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { revokeInvitation } from '@/lib/data/links';

type Ctx = { params: Promise<{ id: string }> };

export const DELETE = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'team.manage');
  return Response.json(await revokeInvitation({ caller, id: parseId(id, 'invitation') }));
});
