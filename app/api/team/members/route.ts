import { handle } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { listMembers } from '@/lib/data/team';

export const GET = handle(async (req) => {
  const caller = await requireApiPermission(req, 'team.read');
  return Response.json({ items: await listMembers({ caller }) });
});
