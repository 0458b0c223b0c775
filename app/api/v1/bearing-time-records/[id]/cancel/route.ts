import { handle, parseBody, parseId, readOptionalJson } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { cancelBearingTimeRecord } from '@/lib/data/bearing-time-records';
import { cancelRequestSchema } from '@/lib/validations/job';

export const dynamic = 'force-dynamic';

type Ctx = { params: Promise<{ id: string }> };

/**
 * Stops a queued or running record (engineers, admins): 200 with the record,
 * now `cancelled`; 409 when it has already ended. The body is empty or `{}`.
 */
export const POST = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'estimates.run');
  parseBody(cancelRequestSchema, await readOptionalJson(req));
  return Response.json(await cancelBearingTimeRecord({ caller, id: parseId(id, 'bearing–time record') }));
});
