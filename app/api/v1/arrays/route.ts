import { handle, readJson } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { createArray, listArrays } from '@/lib/data/arrays';

/** GET /api/v1/arrays: {"items": [the team's arrays at their latest revision]}. */
export const GET = handle(async (req) => {
  const caller = await requireApiPermission(req, 'arrays.read');
  return Response.json({ items: await listArrays({ caller }) });
});

/** POST /api/v1/arrays: 201 with the new array (revision 1) as GET answers it. */
export const POST = handle(async (req) => {
  const caller = await requireApiPermission(req, 'arrays.edit');
  const body = await readJson(req);
  const array = await createArray({ caller, input: body });
  return Response.json(array, { status: 201, headers: { location: `/api/v1/arrays/${array.id}` } });
});
