import { handle, parseId } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { rerunEstimate, v1RunBody } from '@/lib/data/estimates';

export const dynamic = 'force-dynamic';

type Ctx = { params: Promise<{ id: string }> };

/**
 * Runs a stored run again with its exact inputs (array revision, dataset
 * checksum, options) and compares the bearings with the stored ones.
 * Waits unless `Prefer: respond-async` (then 202 and no comparison yet).
 */
export const POST = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'estimates.run');
  const async = /\brespond-async\b/i.test(req.headers.get('prefer') ?? '');
  const out = await rerunEstimate({ caller, id: parseId(id, 'estimate run'), wait: !async });
  return Response.json(
    {
      ...v1RunBody(out.run),
      rerunOf: out.rerunOf,
      softwareVersionThen: out.softwareVersionThen,
      comparison: out.comparison,
    },
    { status: async ? 202 : 201, headers: { location: `/api/v1/estimates/${out.run.id}` } },
  );
});
