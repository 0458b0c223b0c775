/**
 * POST /api/v1/bearing-time-records body (issue 14; docs/bearing-time-records.md),
 * shared by the route handler, the page's form and the OpenAPI document. Every
 * message names its field. The cross-field rules that need the recording (channel
 * count, Nyquist, block and FFT lengths against the sample rate) are checked by
 * lib/doa/wideband planWideband when the record is created, before anything is stored.
 */
import { z } from 'zod';

const int = (field: string, min: number, max: number) =>
  z
    .number({ error: `${field} must be a whole number` })
    .int({ error: `${field} must be a whole number` })
    .min(min, { error: `${field} must be at least ${min}` })
    .max(max, { error: `${field} must be at most ${max}` });

const positive = (field: string) =>
  z
    .number({ error: `${field} must be a number` })
    .refine(Number.isFinite, { error: `${field} must be finite` })
    .refine((v) => v > 0, { error: `${field} must be greater than 0` });

export const BTR_METHODS = ['music', 'mvdr', 'bartlett'] as const;
export const BTR_WINDOWS = ['hann', 'hamming', 'rectangular'] as const;
export const BTR_ESTIMATORS = ['spectrum-peaks', 'per-bin-music', 'per-bin-root-music'] as const;

/** Defaults the form shows and the server applies. */
export const BTR_DEFAULTS = {
  blockSeconds: 1,
  blockOverlap: 0.5,
  fftLength: 1024,
  window: 'hann',
  method: 'music',
  sourceCountRule: 'mdl',
  gratingLobes: 'exclude',
  /** Used only when neither the request nor the array revision gives a speed (sea water, common practice). */
  propagationSpeedMps: 1500,
} as const;

export const bearingTimeRecordRequestSchema = z
  .object({
    name: z
      .string({ error: 'name must be text' })
      .trim()
      .max(200, { error: 'name must be at most 200 characters' })
      .optional()
      .meta({ description: 'A label for the record (default: the dataset name)' }),
    datasetId: int('datasetId', 1, Number.MAX_SAFE_INTEGER).meta({
      description: 'A time-series dataset of your team: WAV (rate from its header) or NPY (samples × channels)',
    }),
    arrayId: int('arrayId', 1, Number.MAX_SAFE_INTEGER).optional().meta({
      description:
        'Use the latest revision of this array: its elements and its spacing in metres (spacing in wavelengths × speed / design frequency)',
    }),
    array: z
      .object(
        {
          elements: int('array.elements', 2, 1024),
          spacingWavelengths: positive('array.spacingWavelengths')
            .refine((v) => v <= 1000, { error: 'array.spacingWavelengths must be at most 1000' })
            .optional()
            .meta({ description: 'Spacing in wavelengths at the top of the band (band.highHz)' }),
          spacingM: positive('array.spacingM').optional().meta({ description: 'Spacing in metres' }),
        },
        { error: 'array must be an object {elements, spacingWavelengths | spacingM}' },
      )
      .optional(),
    propagationSpeedMps: positive('propagationSpeedMps')
      .optional()
      .meta({ description: 'Propagation speed in m/s (default: the array revision’s, else 1500)' }),
    sampleRate: positive('sampleRate')
      .optional()
      .meta({ description: 'NPY recordings: samples per second (WAV files carry their own)' }),
    band: z
      .object(
        {
          lowHz: z.number({ error: 'band.lowHz must be a number' }).min(0, { error: 'band.lowHz must be ≥ 0' }),
          highHz: positive('band.highHz'),
        },
        { error: 'band must be an object {lowHz, highHz}' },
      )
      .meta({ description: 'Analysis band in Hz; every FFT bin whose centre lies in it is used' }),
    blockSeconds: positive('blockSeconds')
      .default(BTR_DEFAULTS.blockSeconds)
      .meta({ description: 'Block length in seconds (one row of the record)' }),
    blockOverlap: z
      .number({ error: 'blockOverlap must be a number' })
      .min(0, { error: 'blockOverlap must be at least 0' })
      .lt(1, { error: 'blockOverlap must be below 1' })
      .default(BTR_DEFAULTS.blockOverlap)
      .meta({ description: 'Fraction of a block shared with the next, 0 … <1' }),
    fftLength: int('fftLength', 16, 65536)
      .refine((v) => (v & (v - 1)) === 0, { error: 'fftLength must be a power of two' })
      .default(BTR_DEFAULTS.fftLength)
      .meta({ description: 'STFT frame length in samples, a power of two from 16 to 65536' }),
    hop: int('hop', 1, 1 << 24)
      .optional()
      .meta({ description: 'Samples between STFT frame starts (default fftLength)' }),
    window: z
      .enum(BTR_WINDOWS, { error: `window must be one of ${BTR_WINDOWS.join(', ')}` })
      .default(BTR_DEFAULTS.window),
    method: z
      .enum(BTR_METHODS, { error: `method must be one of ${BTR_METHODS.join(', ')}` })
      .default(BTR_DEFAULTS.method)
      .meta({ description: 'Narrowband spectrum averaged incoherently over the bins' }),
    sourceCount: int('sourceCount', 0, 1023)
      .optional()
      .meta({ description: 'Sources per block K; without it sourceCountRule picks K per bin (median over bins)' }),
    sourceCountRule: z.enum(['mdl', 'aic'], { error: 'sourceCountRule must be mdl or aic' }).optional(),
    gratingLobes: z
      .enum(['exclude', 'include'], { error: 'gratingLobes must be exclude or include' })
      .default(BTR_DEFAULTS.gratingLobes)
      .meta({ description: 'Bins where the spacing exceeds half a wavelength: left out, or kept and flagged' }),
    bearingEstimator: z
      .enum(BTR_ESTIMATORS, { error: `bearingEstimator must be one of ${BTR_ESTIMATORS.join(', ')}` })
      .optional()
      .meta({ description: 'Default per-bin-music for music, spectrum-peaks otherwise' }),
  })
  .superRefine((v, ctx) => {
    if ((v.arrayId === undefined) === (v.array === undefined)) {
      ctx.addIssue({
        code: 'custom',
        path: ['array'],
        message: 'give exactly one of arrayId and array {elements, spacingWavelengths | spacingM}',
      });
    }
    if (v.array && (v.array.spacingWavelengths === undefined) === (v.array.spacingM === undefined)) {
      ctx.addIssue({
        code: 'custom',
        path: ['array', 'spacingM'],
        message: 'give exactly one of array.spacingWavelengths and array.spacingM',
      });
    }
    if (v.array?.spacingM !== undefined && v.propagationSpeedMps === undefined) {
      ctx.addIssue({
        code: 'custom',
        path: ['propagationSpeedMps'],
        message:
          'propagationSpeedMps is needed with array.spacingM (each bin’s spacing in wavelengths is spacingM·f/c)',
      });
    }
    if (v.band.highHz <= v.band.lowHz) {
      ctx.addIssue({ code: 'custom', path: ['band', 'highHz'], message: 'band.highHz must be above band.lowHz' });
    }
    if (v.sourceCount !== undefined && v.sourceCountRule !== undefined) {
      ctx.addIssue({
        code: 'custom',
        path: ['sourceCountRule'],
        message: 'give sourceCount or sourceCountRule, not both',
      });
    }
  });

export type BearingTimeRecordRequest = z.infer<typeof bearingTimeRecordRequestSchema>;
export type BearingTimeRecordRequestInput = z.input<typeof bearingTimeRecordRequestSchema>;

/** GET /api/v1/bearing-time-records/{id}/export query. */
export const bearingTimeRecordExportSchema = z.object({
  format: z.enum(['csv', 'json', 'png'], { error: 'format must be csv, json or png' }),
});

// ---- answer schemas (the OpenAPI document) -------------------------------------

const status = z.enum(['queued', 'running', 'done', 'failed', 'cancelled']);

export const bearingTimeBlockSchema = z.object({
  index: z.int(),
  startS: z.number(),
  endS: z.number(),
  sourceCount: z.int(),
  bearingsDeg: z.array(z.number()),
  stdDeg: z.array(z.number()).meta({ description: '±σ per bearing from the wideband CRB, degrees' }),
  warnings: z.array(z.string()),
});

const trackEnd = z.object({ tS: z.number(), bearingDeg: z.number() });

export const bearingTimeTrackSchema = z.object({
  id: z.int(),
  startS: z.number(),
  endS: z.number(),
  start: trackEnd,
  end: trackEnd,
  meanRateDegPerS: z.number(),
  points: z.array(z.object({ tS: z.number(), bearingDeg: z.number(), measuredDeg: z.number(), blockIndex: z.int() })),
});

export const bearingTimeRecordSchema = z.object({
  id: z.int(),
  name: z.string(),
  status,
  progress: z.number(),
  error: z.string().nullable(),
  datasetId: z.int().nullable(),
  arrayRevisionId: z.int().nullable(),
  inputs: z.record(z.string(), z.unknown()).meta({
    description: 'The request, the resolved analysis options, the dataset, the recording and the array',
  }),
  softwareVersion: z.string(),
  createdAt: z.string(),
  updatedAt: z.string(),
  createdBy: z.object({ id: z.int(), name: z.string() }).nullable(),
  blocks: z.array(bearingTimeBlockSchema).meta({ description: 'Every block, in time order (empty until done)' }),
  tracks: z.array(bearingTimeTrackSchema),
  image: z
    .object({
      bearingsDeg: z.array(z.number()),
      timesS: z.array(z.number()),
      levelsDb: z.array(z.array(z.number())).meta({ description: 'levelsDb[row][column], group maxima in dB' }),
    })
    .nullable()
    .meta({ description: 'The record on a display grid of at most 1024 rows (null until done)' }),
  summary: z.record(z.string(), z.unknown()).nullable(),
});

export const bearingTimeBlockDetailSchema = bearingTimeBlockSchema.extend({
  spectrum: z.object({ bearingsDeg: z.array(z.number()), levelsDb: z.array(z.number()) }),
});
