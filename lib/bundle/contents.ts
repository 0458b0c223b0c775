/**
 * The files inside a hand-off bundle besides manifest.json (schema version 1,
 * layout in lib/bundle/bundle.ts and the README): their paths and their zod
 * schemas. The writer (lib/handoff/export.ts) builds values of the inferred
 * types and the reader (lib/handoff/import.ts) parses with the same schemas,
 * so the format is described once.
 */
import { z } from 'zod';

export const REVISION_PATH = 'array/revision.json';
export const CALIBRATION_PATH = 'array/calibration.csv';
export const BEAM_CHART_PATH = 'charts/beam-pattern.svg';
export const SEPARATION_CHART_PATH = 'charts/separation-vs-aperture.svg';
export const SUMMARY_PATH = 'summary.txt';

/** array/revision.json: one array revision with its sign-offs. */
export const bundleRevisionSchema = z.object({
  format: z.literal('steerwise-array-revision', { error: 'format must be "steerwise-array-revision"' }),
  name: z.string().min(1).max(120),
  revision: z.number().int().min(1),
  createdAt: z.string(),
  author: z.object({ name: z.string(), email: z.string() }).nullable(),
  elements: z.number().int(),
  spacingWavelengths: z.number().positive(),
  frequencyHz: z.number().positive().nullable(),
  propagationSpeedMps: z.number().positive().nullable(),
  /** The validated array input (lib/validations/array.ts), exactly as stored; checked again with that schema on import. */
  config: z.record(z.string(), z.unknown()),
  signOffs: z
    .array(z.object({ by: z.string(), at: z.string(), note: z.string() }))
    .max(100)
    .default([]),
});
export type BundleRevisionJson = z.infer<typeof bundleRevisionSchema>;

/** datasets/<id>/dataset.json: the metadata of one dataset; `file` is the path of its data file inside the bundle. */
export const bundleDatasetSchema = z.object({
  format: z.literal('steerwise-dataset', { error: 'format must be "steerwise-dataset"' }),
  originalId: z.number().int(),
  name: z.string().min(1).max(200),
  fileFormat: z.enum(['csv', 'npy', 'hdf5', 'wav']),
  elements: z.number().int().min(2),
  snapshots: z.number().int().min(1),
  sha256: z.string().regex(/^[0-9a-f]{64}$/),
  bytes: z.number().int().nonnegative(),
  originalName: z.string().min(1).max(255),
  options: z.record(z.string(), z.unknown()).nullable(),
  createdAt: z.string(),
  file: z.string().min(1),
});
export type BundleDatasetJson = z.infer<typeof bundleDatasetSchema>;

/** What a dataset.json may set as parse options of its dataset (the rest is ignored). */
export const bundleDatasetOptionsSchema = z
  .object({
    datasetPath: z.string().max(400).optional(),
    frequencyHz: z.number().positive().optional(),
    fftLength: z.number().int().min(2).max(65536).optional(),
    hop: z.number().int().min(1).optional(),
    window: z.enum(['hann', 'hamming', 'rectangular']).optional(),
  })
  .partial();

/**
 * The element calibration a run applied (inputs.calibration, lib/data/estimates.ts RunCalibration):
 * gains in dB and phases in degrees per element relative to element 1 (docs/conventions.md §9).
 * A re-run divides the snapshots by these gains when `applied` is true.
 */
export const bundleRunCalibrationSchema = z.object({
  applied: z.boolean({ error: 'inputs.calibration.applied must be true or false' }),
  revision: z.number().int().min(1).optional(),
  arrayRevisionId: z.number().int().optional(),
  gains: z
    .array(
      z.object({
        gainDb: z.number({ error: 'inputs.calibration.gains[].gainDb must be a number' }).min(-200).max(200),
        phaseDeg: z.number({ error: 'inputs.calibration.gains[].phaseDeg must be a number' }).min(-3600).max(3600),
      }),
    )
    .max(4096)
    .optional(),
  note: z.string().max(400).optional(),
});
export type BundleRunCalibration = z.infer<typeof bundleRunCalibrationSchema>;

/** inputs.array.disabledElements of a run: 1-based element numbers, ascending. */
export const bundleRunDisabledElementsSchema = z
  .array(z.number().int().min(1), { error: 'inputs.array.disabledElements must be a list of element numbers' })
  .max(4096)
  .refine((v) => v.every((x, i) => i === 0 || x > v[i - 1]), {
    error: 'inputs.array.disabledElements must be strictly ascending',
  });

/** The parts of a run's inputs the re-run reads besides the options: calibration and disabled elements. */
export const bundleRunImperfectionsSchema = z.object({
  calibration: bundleRunCalibrationSchema.optional(),
  array: z.object({ disabledElements: bundleRunDisabledElementsSchema.optional() }).loose().optional(),
});

/**
 * runs/<id>.json: one finished estimate run. `dataset` is the folder of its
 * dataset inside the bundle (datasets/<id>), or null when the data is not
 * included; `inputs` and `result` are stored as lib/data/estimates.ts wrote them.
 */
export const bundleRunSchema = z.object({
  format: z.literal('steerwise-estimate-run', { error: 'format must be "steerwise-estimate-run"' }),
  originalId: z.number().int(),
  createdAt: z.string(),
  softwareVersion: z.string().max(40),
  datasetSha256: z.string().nullable(),
  dataset: z.string().nullable(),
  inputs: z.record(z.string(), z.unknown()).superRefine((inputs, ctx) => {
    const parsed = bundleRunImperfectionsSchema.safeParse(inputs);
    if (!parsed.success)
      for (const issue of parsed.error.issues)
        ctx.addIssue({ code: 'custom', path: issue.path, message: issue.message });
  }),
  result: z.record(z.string(), z.unknown()),
});
export type BundleRunJson = z.infer<typeof bundleRunSchema>;
