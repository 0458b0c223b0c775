import { z } from 'zod';
import { emailSchema } from '@/lib/validations/account';

const idList = (field: string) =>
  z
    .array(
      z
        .number({ error: `${field} must list ids` })
        .int({ error: `${field} must list whole-number ids` })
        .positive({ error: `${field} must list ids ≥ 1` }),
      { error: `${field} must be a list of ids` },
    )
    .max(50, { error: `${field}: at most 50 per bundle` })
    .optional();

/** POST /api/handoff: send a bundle of an array revision to a colleague by e-mail. */
export const handoffSendSchema = z.strictObject({
  arrayId: z
    .number({ error: 'arrayId is required' })
    .int({ error: 'arrayId must be a whole number' })
    .positive({ error: 'arrayId must be ≥ 1' }),
  revision: z
    .number({ error: 'revision must be a whole number' })
    .int({ error: 'revision must be a whole number' })
    .positive({ error: 'revision must be ≥ 1' })
    .optional(),
  recipientEmail: emailSchema,
  note: z
    .string({ error: 'note must be text' })
    .trim()
    .max(2000, { error: 'note must be at most 2000 characters' })
    .optional(),
  datasets: idList('datasets'),
  runs: idList('runs'),
});
export type HandoffSendInput = z.infer<typeof handoffSendSchema>;

/** A comma-separated list of ids in a query parameter, e.g. ?runs=3,4. */
const idQueryList = (field: string) =>
  z
    .string()
    .trim()
    .optional()
    .transform((v, ctx) => {
      if (!v) return [] as number[];
      const parts = v
        .split(',')
        .map((p) => p.trim())
        .filter(Boolean);
      const out: number[] = [];
      for (const p of parts) {
        if (!/^[1-9][0-9]{0,15}$/.test(p)) {
          ctx.addIssue({
            code: 'custom',
            message: `${field} must be a comma-separated list of ids (got '${p.slice(0, 20)}')`,
          });
          return z.NEVER;
        }
        out.push(Number(p));
      }
      if (out.length > 50) {
        ctx.addIssue({ code: 'custom', message: `${field}: at most 50 ids per bundle` });
        return z.NEVER;
      }
      return out;
    });

/** Query of GET /api/v1/arrays/{id}/bundle: ?revision=&datasets=1,2&runs=3 */
export const bundleQuerySchema = z.object({
  revision: z
    .string()
    .trim()
    .optional()
    .transform((v, ctx) => {
      if (v === undefined || v === '') return undefined;
      if (!/^[1-9][0-9]{0,8}$/.test(v)) {
        ctx.addIssue({ code: 'custom', message: `revision must be a revision number ≥ 1 (got '${v.slice(0, 20)}')` });
        return z.NEVER;
      }
      return Number(v);
    }),
  datasets: idQueryList('datasets'),
  runs: idQueryList('runs'),
});

export function bundleQueryFrom(url: string) {
  const q = new URL(url).searchParams;
  return bundleQuerySchema.parse({
    revision: q.get('revision') ?? undefined,
    datasets: q.get('datasets') ?? undefined,
    runs: q.get('runs') ?? undefined,
  });
}
