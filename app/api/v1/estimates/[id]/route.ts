import { handle, parseId } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { getEstimateRun, v1RunBody } from '@/lib/data/estimates';

export const dynamic = 'force-dynamic';

type Ctx = { params: Promise<{ id: string }> };

/** The run: the §7 fields of its first method, its inputs, status, progress and every method's result. */
export const GET = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'datasets.read');
  return Response.json(v1RunBody(await getEstimateRun({ caller, id: parseId(id, 'estimate run') })));
});
