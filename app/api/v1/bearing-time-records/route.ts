import { handle, parseBody, readJson } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { createBearingTimeRecord, listBearingTimeRecords } from '@/lib/data/bearing-time-records';
import { bearingTimeRecordRequestSchema } from '@/lib/validations/bearing-time-record';

export const dynamic = 'force-dynamic';

/** The caller's team's bearing–time records, newest first (without blocks, tracks or image). */
export const GET = handle(async (req) => {
  const caller = await requireApiPermission(req, 'datasets.read');
  return Response.json({ items: await listBearingTimeRecords({ caller }) });
});

/** Starts a bearing–time record on the job queue: 202 {id, status}; poll GET /api/v1/bearing-time-records/{id}. */
export const POST = handle(async (req) => {
  const caller = await requireApiPermission(req, 'estimates.run');
  const input = parseBody(bearingTimeRecordRequestSchema, await readJson(req));
  const { id, status } = await createBearingTimeRecord({ caller, input });
  return Response.json({ id, status }, { status: 202, headers: { location: `/api/v1/bearing-time-records/${id}` } });
});
