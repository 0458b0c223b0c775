import { handle, parseBody, readJson } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { computeBounds } from '@/lib/data/estimates';
import { boundsRequestSchema } from '@/lib/validations/estimate';

export const dynamic = 'force-dynamic';

/** POST /api/v1/bounds (docs/conventions.md §7): stochastic CRB per source, the Rayleigh gap and the pair gap test. */
export const POST = handle(async (req) => {
  const caller = await requireApiPermission(req, 'datasets.read');
  const input = parseBody(boundsRequestSchema, await readJson(req));
  return Response.json(await computeBounds({ caller, input }));
});
