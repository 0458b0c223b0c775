import { handle, parseId, readJson } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { removeMember, updateMemberRole } from '@/lib/data/team';
import { memberUpdateSchema } from '@/lib/validations/team';

type Ctx = { params: Promise<{ id: string }> };

export const PATCH = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'team.manage');
  const input = memberUpdateSchema.parse(await readJson(req));
  return Response.json(await updateMemberRole({ caller, id: parseId(id, 'member'), role: input.role }));
});

export const DELETE = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'team.manage');
  await removeMember({ caller, id: parseId(id, 'member') });
  return new Response(null, { status: 204 });
});
