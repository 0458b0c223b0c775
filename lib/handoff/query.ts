import { z } from 'zod';

const idList = (field: string) =>
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
  datasets: idList('datasets'),
  runs: idList('runs'),
});

export function bundleQueryFrom(url: string) {
  const q = new URL(url).searchParams;
  return bundleQuerySchema.parse({
    revision: q.get('revision') ?? undefined,
    datasets: q.get('datasets') ?? undefined,
    runs: q.get('runs') ?? undefined,
  });
}
