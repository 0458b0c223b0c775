import { handle, parseBody, parseId, readOptionalJson } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { cancelEstimate, v1RunBody } from '@/lib/data/estimates';
import { cancelRequestSchema } from '@/lib/validations/job';

export const dynamic = 'force-dynamic';

type Ctx = { params: Promise<{ id: string }> };

/**
 * Stops a queued or running estimate run (engineers, admins): 200 with the
 * run, now `cancelled`; 409 when it has already ended. The body is empty or `{}`.
 */
export const POST = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'estimates.run');
  parseBody(cancelRequestSchema, await readOptionalJson(req));
  return Response.json(v1RunBody(await cancelEstimate({ caller, id: parseId(id, 'estimate run') })));
});
