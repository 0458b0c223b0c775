import { handle, readJson } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { getTeam, updateTeam } from '@/lib/data/team';
import { teamSettingsSchema } from '@/lib/validations/team';

export const GET = handle(async (req) => {
  const caller = await requireApiPermission(req, 'team.read');
  return Response.json(await getTeam({ caller }));
});

export const PATCH = handle(async (req) => {
  const caller = await requireApiPermission(req, 'team.manage');
  const input = teamSettingsSchema.parse(await readJson(req));
  return Response.json(await updateTeam({ caller, input }));
});
