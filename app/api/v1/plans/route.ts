import { ApiError, handle, readJson } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { createPlan } from '@/lib/data/plans';
import { planRequestSchema } from '@/lib/validations/plan';

export const dynamic = 'force-dynamic';

/**
 * POST /api/v1/plans: element count, spacing and snapshot count meeting an accuracy (and
 * resolution) target; the Pareto front of elements against snapshots. Stores nothing.
 */
export const POST = handle(async (req) => {
  const caller = await requireApiPermission(req, 'arrays.read');
  const parsed = planRequestSchema.safeParse(await readJson(req));
  if (!parsed.success) {
    const fields: Record<string, string[]> = {};
    for (const issue of parsed.error.issues) {
      const key = issue.path.length ? issue.path.join('.') : '_';
      (fields[key] ??= []).push(issue.message);
    }
    const [key, messages] = Object.entries(fields)[0];
    throw new ApiError('validation_failed', `${key === '_' ? 'body' : key}: ${messages[0]}`, { fields });
  }
  return Response.json(createPlan({ caller, input: parsed.data }));
});
