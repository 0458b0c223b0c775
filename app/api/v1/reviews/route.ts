import { handle, readJson } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { createReview, listReviews } from '@/lib/data/reviews';
import { reviewCreateSchema, reviewQuerySchema } from '@/lib/validations/review';

/**
 * Reviews of one array revision (?arrayId=&revision=) or one run (?runId=).
 * GET: the thread, its sign-offs and status. POST {arrayId, revision | runId,
 * kind: comment | approval | changes-requested, body}: comments need
 * review.comment (engineer, reviewer, admin); approvals and requests for
 * changes need review.approve (reviewer, admin). 201 with the thread.
 */
export const GET = handle(async (req) => {
  const caller = await requireApiPermission(req, 'arrays.read');
  const q = new URL(req.url).searchParams;
  const query = reviewQuerySchema.parse({
    arrayId: q.get('arrayId') ?? undefined,
    revision: q.get('revision') ?? undefined,
    runId: q.get('runId') ?? undefined,
  });
  return Response.json(await listReviews({ caller, ...query }));
});

export const POST = handle(async (req) => {
  // Every kind needs review.comment (approvers hold it too), checked before the body is read; approvals need more below.
  const caller = await requireApiPermission(req, 'review.comment');
  const input = reviewCreateSchema.parse(await readJson(req));
  return Response.json(await createReview({ caller, input, origin: new URL(req.url).origin }), { status: 201 });
});
