import { z } from 'zod';

const queryId = (field: string) =>
  z
    .string()
    .regex(/^[1-9][0-9]{0,15}$/, { error: `${field} must be a positive whole number` })
    .transform(Number)
    .optional();

/** Query of GET /api/v1/reviews: ?arrayId=&revision= (an array revision) or ?runId= (a run). */
export const reviewQuerySchema = z.object({
  arrayId: queryId('arrayId'),
  revision: queryId('revision'),
  runId: queryId('runId'),
});

/** POST /api/v1/reviews: a comment, an approval (sign-off) or a request for changes on one array revision or one run. */
export const reviewCreateSchema = z
  .strictObject({
    arrayId: z.number({ error: 'arrayId must be a whole number' }).int().positive().optional(),
    revision: z.number({ error: 'revision must be a whole number' }).int().positive().optional(),
    runId: z.number({ error: 'runId must be a whole number' }).int().positive().optional(),
    kind: z.enum(['comment', 'approval', 'changes-requested'], {
      error: 'kind must be comment, approval or changes-requested',
    }),
    body: z
      .string({ error: 'body must be text' })
      .trim()
      .max(4000, { error: 'body must be at most 4000 characters' })
      .default(''),
  })
  .superRefine((v, ctx) => {
    const onArray = v.arrayId !== undefined;
    if (onArray === (v.runId !== undefined))
      ctx.addIssue({
        code: 'custom',
        path: ['arrayId'],
        message: 'give arrayId and revision (an array revision) or runId (a run), not both',
      });
    if (onArray && v.revision === undefined)
      ctx.addIssue({ code: 'custom', path: ['revision'], message: 'revision is required with arrayId' });
    if (v.kind !== 'approval' && !v.body)
      ctx.addIssue({
        code: 'custom',
        path: ['body'],
        message: v.kind === 'comment' ? 'body: write the comment' : 'body: say what should change',
      });
  });
export type ReviewCreateInput = z.infer<typeof reviewCreateSchema>;
