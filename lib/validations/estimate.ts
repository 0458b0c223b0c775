/**
 * POST /api/v1/estimates and POST /api/v1/bounds bodies (docs/conventions.md §7), one
 * zod schema each, shared by the route handlers, the estimate form and the
 * OpenAPI document. Messages name their field.
 *
 * One addition to §7 for the browser: `methods` (a list) may replace `method`
 * to run several methods on one covariance in one stored run; a v1 client
 * that sends `method` gets exactly the §7 answer.
 */
import { z } from 'zod';
import { DOA_METHODS } from '@/lib/doa/methods/registry';

export const MAX_INLINE_ELEMENTS = 512;

const positiveInt = (field: string, min = 1) =>
  z
    .number({ error: `${field} must be a whole number` })
    .int({ error: `${field} must be a whole number` })
    .min(min, { error: `${field} must be at least ${min}` });

/**
 * N rows of M finite numbers. One loop over the values instead of a zod number schema per entry
 * (a 16 × 1000 inline set is 32,000 entries: the per-entry schema cost about 2.5 ms a request);
 * the first bad entry is reported at its path [row, column] with the message the per-entry schema
 * gave, plus where it is (1-based).
 */
const matrix = (field: string) =>
  z
    .custom<number[][]>((v) => Array.isArray(v), {
      error: `${field} must be a list of rows (N snapshots of M elements)`,
    })
    .superRefine((rows, ctx) => {
      for (let r = 0; r < rows.length; r++) {
        const row = rows[r] as unknown;
        if (!Array.isArray(row)) {
          ctx.addIssue({ code: 'custom', path: [r], message: `${field} must be a list of rows`, continue: false });
          return;
        }
        for (let c = 0; c < row.length; c++) {
          const v = row[c];
          if (typeof v !== 'number' || !Number.isFinite(v)) {
            ctx.addIssue({
              code: 'custom',
              path: [r, c],
              message: `${field} entries must be finite numbers (row ${r + 1}, column ${c + 1})`,
              continue: false,
            });
            return;
          }
        }
      }
    })
    .meta({ type: 'array', items: { type: 'array', items: { type: 'number' } } });

export const inlineArraySchema = z.object(
  {
    elements: positiveInt('array.elements', 2).max(MAX_INLINE_ELEMENTS, {
      error: `array.elements must be at most ${MAX_INLINE_ELEMENTS}`,
    }),
    spacingWavelengths: z
      .number({ error: 'array.spacingWavelengths must be a number' })
      .positive({ error: 'array.spacingWavelengths must be greater than 0' })
      .max(1e6, { error: 'array.spacingWavelengths is too large' }),
  },
  { error: 'array must be an object {elements, spacingWavelengths}' },
);

export const inlineSnapshotsSchema = z
  .object(
    { re: matrix('snapshots.re'), im: matrix('snapshots.im') },
    { error: 'snapshots must be an object {re, im}, each N rows of M numbers' },
  )
  .superRefine((s, ctx) => {
    if (s.re.length === 0) {
      ctx.addIssue({ code: 'custom', path: ['re'], message: 'snapshots.re has no rows: send at least one snapshot' });
      return;
    }
    if (s.re.length !== s.im.length) {
      ctx.addIssue({
        code: 'custom',
        path: ['im'],
        message: `snapshots.im has ${s.im.length} rows but snapshots.re has ${s.re.length}`,
      });
      return;
    }
    const m = s.re[0].length;
    for (let r = 0; r < s.re.length; r++) {
      if (s.re[r].length !== m) {
        ctx.addIssue({
          code: 'custom',
          path: ['re'],
          message: `snapshots.re row ${r + 1} has ${s.re[r].length} values, row 1 has ${m}`,
        });
        return;
      }
      if (s.im[r].length !== m) {
        ctx.addIssue({
          code: 'custom',
          path: ['im'],
          message: `snapshots.im row ${r + 1} has ${s.im[r].length} values, snapshots.re rows have ${m}`,
        });
        return;
      }
    }
    if (m < 2)
      ctx.addIssue({
        code: 'custom',
        path: ['re'],
        message: `snapshots rows have ${m} value(s); an array needs at least 2 elements`,
      });
  });

export const doaMethodSchema = z.enum(DOA_METHODS, { error: `method must be one of ${DOA_METHODS.join(', ')}` });

export const estimateRequestSchema = z
  .object({
    datasetId: positiveInt('datasetId').optional(),
    snapshots: inlineSnapshotsSchema.optional(),
    arrayId: positiveInt('arrayId').optional(),
    arrayRevision: positiveInt('arrayRevision')
      .optional()
      .meta({ description: 'Extension: pin a saved revision of arrayId (default: its latest revision)' }),
    array: inlineArraySchema.optional(),
    method: doaMethodSchema.optional(),
    methods: z
      .array(doaMethodSchema, { error: 'methods must be a list of method names' })
      .min(1, { error: 'methods must name at least one method' })
      .max(DOA_METHODS.length, { error: `methods may name at most ${DOA_METHODS.length} methods` })
      .optional()
      .meta({ description: 'Browser extension: several methods in one run (instead of method)' }),
    sourceCount: z
      .number({ error: 'sourceCount must be a whole number' })
      .int({ error: 'sourceCount must be a whole number' })
      .min(0, { error: 'sourceCount must be at least 0' })
      .optional(),
    sourceCountRule: z.enum(['mdl', 'aic'], { error: 'sourceCountRule must be "mdl" or "aic"' }).optional(),
    forwardBackward: z.boolean({ error: 'forwardBackward must be true or false' }).optional(),
    smoothingSubarray: positiveInt('smoothingSubarray', 2).optional(),
    singleSnapshot: z.boolean({ error: 'singleSnapshot must be true or false' }).optional(),
    singleSnapshotSubarray: positiveInt('singleSnapshotSubarray', 2).optional(),
    includeSpectrum: z.boolean({ error: 'includeSpectrum must be true or false' }).optional(),
    applyCalibration: z.boolean({ error: 'applyCalibration must be true or false' }).optional().meta({
      description:
        "Extension: divide the snapshots by the array revision's complex element gains before the covariance (default true; only with arrayId or a dataset's array)",
    }),
  })
  .superRefine((v, ctx) => {
    if ((v.datasetId === undefined) === (v.snapshots === undefined)) {
      ctx.addIssue({ code: 'custom', path: ['datasetId'], message: 'give exactly one of datasetId and snapshots' });
    }
    if (v.arrayId !== undefined && v.array !== undefined) {
      ctx.addIssue({ code: 'custom', path: ['arrayId'], message: 'give arrayId or array, not both' });
    }
    if (v.arrayRevision !== undefined && v.arrayId === undefined) {
      ctx.addIssue({
        code: 'custom',
        path: ['arrayRevision'],
        message: 'arrayRevision pins a revision of arrayId; give arrayId too',
      });
    }
    if ((v.method === undefined) === (v.methods === undefined)) {
      ctx.addIssue({
        code: 'custom',
        path: ['method'],
        message: v.method === undefined ? 'method is required' : 'give method or methods, not both',
      });
    }
    if (v.methods && new Set(v.methods).size !== v.methods.length) {
      ctx.addIssue({ code: 'custom', path: ['methods'], message: 'methods lists a method twice' });
    }
    if (v.singleSnapshotSubarray !== undefined && !v.singleSnapshot) {
      ctx.addIssue({
        code: 'custom',
        path: ['singleSnapshotSubarray'],
        message: 'singleSnapshotSubarray is only used with singleSnapshot: true',
      });
    }
  });

export type EstimateRequest = z.infer<typeof estimateRequestSchema>;

export const warningSchema = z.object({ code: z.string(), message: z.string() });

export const estimateAnswerSchema = z.object({
  id: z.int(),
  method: doaMethodSchema,
  sourceCount: z.int(),
  sourceCountRule: z.enum(['given', 'mdl', 'aic']),
  bearingsDeg: z.array(z.number()),
  eigenvalues: z.array(z.number()),
  warnings: z.array(warningSchema),
  spectrum: z.object({ startDeg: z.number(), stepDeg: z.number(), valuesDb: z.array(z.number()) }).optional(),
});

export const estimateRunSchema = estimateAnswerSchema
  .partial({
    method: true,
    sourceCount: true,
    sourceCountRule: true,
    bearingsDeg: true,
    eigenvalues: true,
    warnings: true,
  })
  .extend({
    status: z.enum(['queued', 'running', 'done', 'failed']),
    progress: z.number(),
    error: z.string().nullable(),
    inputs: z.record(z.string(), z.unknown()),
    softwareVersion: z.string(),
    datasetSha256: z.string().nullable(),
    arrayRevisionId: z.int().nullable(),
    results: z
      .array(z.record(z.string(), z.unknown()))
      .meta({ description: 'One entry per method, with CRB uncertainty and pair resolvability' }),
  });

export const boundsRequestSchema = z
  .object({
    array: inlineArraySchema,
    bearingsDeg: z
      .array(z.number({ error: 'bearingsDeg entries must be numbers' }), {
        error: 'bearingsDeg must be a list of degrees',
      })
      .min(1, { error: 'bearingsDeg must hold at least one bearing' }),
    sourcePowers: z.array(z.number({ error: 'sourcePowers entries must be numbers' }), {
      error: 'sourcePowers must be a list',
    }),
    noisePower: z.number({ error: 'noisePower must be a number' }),
    snapshots: positiveInt('snapshots'),
  })
  .superRefine((v, ctx) => {
    if (v.sourcePowers.length !== v.bearingsDeg.length) {
      ctx.addIssue({
        code: 'custom',
        path: ['sourcePowers'],
        message: `sourcePowers has ${v.sourcePowers.length} entries but bearingsDeg has ${v.bearingsDeg.length}`,
      });
    }
  });

export const boundsAnswerSchema = z.object({
  crbStdDeg: z.array(z.number()),
  rayleighGapU: z.number(),
  pairs: z.array(z.object({ i: z.int(), j: z.int(), separationU: z.number(), belowResolvableGap: z.boolean() })),
});
