import { handle, readJson } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { createInvitation, listInvitations } from '@/lib/data/links';
import { invitationSchema } from '@/lib/validations/team';

export const GET = handle(async (req) => {
  const caller = await requireApiPermission(req, 'team.manage');
  return Response.json({ items: await listInvitations({ caller }) });
});

export const POST = handle(async (req) => {
  const caller = await requireApiPermission(req, 'team.manage');
  const input = invitationSchema.parse(await readJson(req));
  return Response.json(await createInvitation({ caller, input, origin: new URL(req.url).origin }), { status: 201 });
});
