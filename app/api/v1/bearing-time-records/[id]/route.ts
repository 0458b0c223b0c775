import { handle, parseId } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { deleteBearingTimeRecord, getBearingTimeRecord } from '@/lib/data/bearing-time-records';

export const dynamic = 'force-dynamic';

type Ctx = { params: Promise<{ id: string }> };

/** A record: status, progress, inputs and (when done) blocks, tracks and the display image. */
export const GET = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'datasets.read');
  return Response.json(await getBearingTimeRecord({ caller, id: parseId(id, 'bearing–time record') }));
});

/** Deletes a record and its files (a running one is stopped): 204. */
export const DELETE = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'estimates.run');
  await deleteBearingTimeRecord({ caller, id: parseId(id, 'bearing–time record') });
  return new Response(null, { status: 204 });
});
