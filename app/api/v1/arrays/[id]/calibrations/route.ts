import { handle, parseId, readJson } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { listCalibrations, submitCalibration } from '@/lib/data/calibrations';
import { parseCalibrationRequest } from '@/lib/validations/calibration';

export const dynamic = 'force-dynamic';

type Ctx = { params: Promise<{ id: string }> };

/** GET /api/v1/arrays/{id}/calibrations: the array's calibrations, newest first. */
export const GET = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'arrays.read');
  return Response.json({ items: await listCalibrations({ caller, arrayId: parseId(id, 'array') }) });
});

/** Whether the client asked not to wait (RFC 7240 `Prefer: respond-async`). */
function wantsAsync(req: Request): boolean {
  return /\brespond-async\b/i.test(req.headers.get('prefer') ?? '');
}

/**
 * POST /api/v1/arrays/{id}/calibrations: one reference `{datasetId, bearingsDeg, frequencyHz?, method?}`
 * or several `{references:[{datasetId, bearingsDeg}], frequencyHz?, method?}`. Waits for the fit and
 * answers 201 `{revision, report, elementStates, …}` with the new revision already created
 * (`accept: false`: revision null, accept later). `Prefer: respond-async`: 202 with the queued calibration.
 */
export const POST = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'arrays.edit');
  const arrayId = parseId(id, 'array');
  const input = parseCalibrationRequest(await readJson(req));
  const async = wantsAsync(req);
  const { calibration, revision } = await submitCalibration({ caller, arrayId, input, wait: !async });
  const headers = { location: `/api/v1/arrays/${arrayId}/calibrations/${calibration.id}` };
  return Response.json({ revision, ...calibration }, { status: async ? 202 : 201, headers });
});
