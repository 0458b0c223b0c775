/**
 * POST /api/v1/studies body, shared by the route handler, the study form and
 * the OpenAPI document. Messages name their field. The pure module
 * (lib/studies/monte-carlo.ts) checks the cross-field rules again (K < L at
 * every point, SNR offsets, the compute budget).
 */
import { z } from 'zod';
import { DOA_METHODS } from '@/lib/doa/methods/registry';
import { STUDY_LIMITS, SWEEP_VARIABLES } from '@/lib/studies/monte-carlo';

const int = (field: string, min: number, max: number) =>
  z
    .number({ error: `${field} must be a whole number` })
    .int({ error: `${field} must be a whole number` })
    .min(min, { error: `${field} must be at least ${min}` })
    .max(max, { error: `${field} must be at most ${max}` });

const num = (field: string) =>
  z.number({ error: `${field} must be a number` }).refine(Number.isFinite, { error: `${field} must be finite` });

export const studyMethodSchema = z.enum(DOA_METHODS, { error: `methods must be among ${DOA_METHODS.join(', ')}` });

export const studyRequestSchema = z
  .object({
    name: z
      .string({ error: 'name must be text' })
      .trim()
      .min(1, { error: 'name must not be empty' })
      .max(200, { error: 'name must be at most 200 characters' }),
    arrayId: int('arrayId', 1, Number.MAX_SAFE_INTEGER)
      .optional()
      .meta({ description: 'Use the latest revision of this array (its elements and spacing)' }),
    array: z
      .object(
        {
          elements: int('array.elements', 2, STUDY_LIMITS.maxElements),
          spacingWavelengths: num('array.spacingWavelengths').refine((d) => d > 0 && d <= 100, {
            error: 'array.spacingWavelengths must lie in (0, 100]',
          }),
        },
        { error: 'array must be an object {elements, spacingWavelengths}' },
      )
      .optional(),
    sources: z.object(
      {
        bearingsDeg: z
          .array(
            num('sources.bearingsDeg entries').refine((b) => b > -90 && b < 90, {
              error: 'sources.bearingsDeg entries must lie strictly inside −90 … 90',
            }),
            { error: 'sources.bearingsDeg must be a list of degrees' },
          )
          .min(1, { error: 'sources.bearingsDeg needs at least one bearing' })
          .max(STUDY_LIMITS.maxSources, {
            error: `sources.bearingsDeg may hold at most ${STUDY_LIMITS.maxSources} bearings`,
          }),
        powersDb: z.array(num('sources.powersDb entries'), {
          error: 'sources.powersDb must be a list of dB values (per-element SNR)',
        }),
        correlation: num('sources.correlation')
          .refine((c) => c >= 0 && c <= 1, { error: 'sources.correlation must lie in 0 … 1' })
          .optional(),
      },
      { error: 'sources must be an object {bearingsDeg, powersDb, correlation?}' },
    ),
    snapshots: int('snapshots', 1, STUDY_LIMITS.maxSnapshots).default(100),
    sweep: z.object(
      {
        variable: z.enum(SWEEP_VARIABLES, { error: `sweep.variable must be one of ${SWEEP_VARIABLES.join(', ')}` }),
        values: z
          .array(num('sweep.values entries'), { error: 'sweep.values must be a list of numbers' })
          .min(1, { error: 'sweep.values needs at least one value' })
          .max(STUDY_LIMITS.maxValues, { error: `sweep.values may hold at most ${STUDY_LIMITS.maxValues} values` }),
      },
      { error: 'sweep must be an object {variable, values}' },
    ),
    methods: z
      .array(studyMethodSchema, { error: 'methods must be a list of method names' })
      .min(1, { error: 'methods must name at least one method' }),
    trials: int('trials', 1, STUDY_LIMITS.maxTrials),
    seed: int('seed', 0, 0xffffffff).default(1),
    forwardBackward: z.boolean({ error: 'forwardBackward must be true or false' }).optional(),
    smoothing: z
      .union([z.literal('none'), z.literal('auto'), int('smoothing', 2, STUDY_LIMITS.maxElements)], {
        error: "smoothing must be 'none', 'auto' or a subarray size",
      })
      .optional(),
  })
  .superRefine((v, ctx) => {
    if ((v.arrayId === undefined) === (v.array === undefined)) {
      ctx.addIssue({
        code: 'custom',
        path: ['array'],
        message: 'give exactly one of arrayId and array {elements, spacingWavelengths}',
      });
    }
    if (v.sources.powersDb.length !== v.sources.bearingsDeg.length) {
      ctx.addIssue({
        code: 'custom',
        path: ['sources'],
        message: `sources.powersDb has ${v.sources.powersDb.length} value(s) for ${v.sources.bearingsDeg.length} bearing(s)`,
      });
    }
  });

export type StudyRequest = z.infer<typeof studyRequestSchema>;
export type StudyRequestInput = z.input<typeof studyRequestSchema>;
