import { handle, readJsonBytes } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { listEstimateRuns, parseEstimateBody, submitEstimate, v1Answer } from '@/lib/data/estimates';

export const dynamic = 'force-dynamic';

/** The caller's team's runs, newest first (the estimates page). */
export const GET = handle(async (req) => {
  const caller = await requireApiPermission(req, 'datasets.read');
  return Response.json({ items: await listEstimateRuns({ caller }) });
});

/** Whether the client asked not to wait (RFC 7240 `Prefer: respond-async`). */
function wantsAsync(req: Request): boolean {
  return /\brespond-async\b/i.test(req.headers.get('prefer') ?? '');
}

/**
 * POST /api/v1/estimates (docs/conventions.md §7). By default the request waits for
 * the run and answers 201 with the §7 body. With `Prefer: respond-async` it
 * answers 202 with the queued run at once; poll GET /api/v1/estimates/{id}.
 */
export const POST = handle(async (req) => {
  const caller = await requireApiPermission(req, 'estimates.run');
  // estimateRequestSchema, applied off the web thread for large bodies (parseEstimateBody).
  const { input, rows } = await parseEstimateBody(await readJsonBytes(req));
  const async = wantsAsync(req);
  const run = await submitEstimate({ caller, input, rows, wait: !async });
  const headers = { location: `/api/v1/estimates/${run.id}` };
  if (async) return Response.json(run, { status: 202, headers });
  return Response.json(v1Answer(run), { status: 201, headers });
});
