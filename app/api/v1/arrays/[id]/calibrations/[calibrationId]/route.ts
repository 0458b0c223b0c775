import { handle, parseId } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { getCalibration } from '@/lib/data/calibrations';

export const dynamic = 'force-dynamic';

type Ctx = { params: Promise<{ id: string; calibrationId: string }> };

/** GET /api/v1/arrays/{id}/calibrations/{calibrationId}: status, progress, report and proposed element states. */
export const GET = handle<Ctx>(async (req, ctx) => {
  const { id, calibrationId } = await ctx.params;
  const caller = await requireApiPermission(req, 'arrays.read');
  return Response.json(
    await getCalibration({ caller, arrayId: parseId(id, 'array'), id: parseId(calibrationId, 'calibration') }),
  );
});
