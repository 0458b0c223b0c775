import { handle, parseId } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { acceptCalibration } from '@/lib/data/calibrations';

export const dynamic = 'force-dynamic';

type Ctx = { params: Promise<{ id: string; calibrationId: string }> };

/** POST …/calibrations/{calibrationId}/accept: creates the array revision from a finished calibration (201). */
export const POST = handle<Ctx>(async (req, ctx) => {
  const { id, calibrationId } = await ctx.params;
  const caller = await requireApiPermission(req, 'arrays.edit');
  const { calibration, revision } = await acceptCalibration({
    caller,
    arrayId: parseId(id, 'array'),
    id: parseId(calibrationId, 'calibration'),
  });
  return Response.json({ revision, ...calibration }, { status: 201 });
});
