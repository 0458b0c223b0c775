import { handle, parseId } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { deleteStudy, getStudy } from '@/lib/data/studies';

export const dynamic = 'force-dynamic';

type Ctx = { params: Promise<{ id: string }> };

/** A study: status, progress, inputs and (when done) the per-point result. */
export const GET = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'arrays.read');
  return Response.json(await getStudy({ caller, id: parseId(id, 'study') }));
});

/** Deletes a study (a running one is stopped): 204. */
export const DELETE = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'studies.run');
  await deleteStudy({ caller, id: parseId(id, 'study') });
  return new Response(null, { status: 204 });
});
