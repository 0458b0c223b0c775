import { handle, parseBody, parseId, readOptionalJson } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { cancelStudy } from '@/lib/data/studies';
import { cancelRequestSchema } from '@/lib/validations/job';

export const dynamic = 'force-dynamic';

type Ctx = { params: Promise<{ id: string }> };

/**
 * Stops a queued or running study (engineers, admins): 200 with the study,
 * now `cancelled`; 409 when it has already ended. The body is empty or `{}`.
 */
export const POST = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'studies.run');
  parseBody(cancelRequestSchema, await readOptionalJson(req));
  return Response.json(await cancelStudy({ caller, id: parseId(id, 'study') }));
});
