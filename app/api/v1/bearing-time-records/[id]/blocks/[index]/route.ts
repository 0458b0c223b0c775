import { ApiError, handle, parseId } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { getBearingTimeRecordBlock } from '@/lib/data/bearing-time-records';

export const dynamic = 'force-dynamic';

type Ctx = { params: Promise<{ id: string; index: string }> };

/** One block of a finished record: its wideband spectrum (dB on the bearing grid), bearings and ±σ. */
export const GET = handle<Ctx>(async (req, ctx) => {
  const { id, index } = await ctx.params;
  const caller = await requireApiPermission(req, 'datasets.read');
  if (!/^\d{1,9}$/.test(index)) {
    throw new ApiError('validation_failed', `index: block index '${index.slice(0, 20)}' must be a whole number ≥ 0`, {
      fields: { index: ['a whole number ≥ 0'] },
    });
  }
  return Response.json(
    await getBearingTimeRecordBlock({ caller, id: parseId(id, 'bearing–time record'), index: Number(index) }),
  );
});
