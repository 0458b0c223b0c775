import { handle, parseId } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { getArray } from '@/lib/data/arrays';

type Ctx = { params: Promise<{ id: string; rev: string }> };

/** GET /api/v1/arrays/{id}/revisions/{rev}: the array as it was saved at that revision (same shape as GET /arrays/{id}). */
export const GET = handle<Ctx>(async (req, ctx) => {
  const { id, rev } = await ctx.params;
  const caller = await requireApiPermission(req, 'arrays.read');
  return Response.json(await getArray({ caller, id: parseId(id, 'array'), revision: parseId(rev, 'revision') }));
});
