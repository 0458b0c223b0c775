import { handle, parseId, readJson } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { getArray, updateArray } from '@/lib/data/arrays';

type Ctx = { params: Promise<{ id: string }> };

/** GET /api/v1/arrays/{id}: the array at its latest revision, with metrics and its revision list. */
export const GET = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'arrays.read');
  return Response.json(await getArray({ caller, id: parseId(id, 'array') }));
});

/** PATCH /api/v1/arrays/{id}: fields as in POST (partial allowed); answers the array at revision + 1. */
export const PATCH = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'arrays.edit');
  const patch = await readJson(req);
  return Response.json(await updateArray({ caller, id: parseId(id, 'array'), patch }));
});
