/**
 * Dataset upload fields (docs/conventions.md §7: multipart `file` plus optional
 * `name`, `arrayId`, `datasetPath` (HDF5), `frequencyHz`, `fftLength`, `hop`,
 * `window` (WAV)). Form fields arrive as text, so numbers are coerced; every
 * message names its field. The answer schemas are here too, for the OpenAPI
 * document.
 */
import { z } from 'zod';

const optionalText = (field: string, max: number) =>
  z
    .string()
    .trim()
    .max(max, { error: `${field} must be at most ${max} characters` })
    .optional()
    .transform((v) => (v === '' ? undefined : v));

const optionalNumber = (field: string, check: (v: number) => boolean, rule: string) =>
  z
    .string()
    .trim()
    .optional()
    .transform((v, ctx) => {
      if (v === undefined || v === '') return undefined;
      const n = Number(v);
      if (!Number.isFinite(n) || !check(n)) {
        ctx.addIssue({ code: 'custom', message: `${field} must be ${rule} (got '${v.slice(0, 40)}')` });
        return z.NEVER;
      }
      return n;
    });

export const datasetUploadFieldsSchema = z.object({
  name: optionalText('name', 200),
  arrayId: optionalNumber('arrayId', (v) => Number.isInteger(v) && v > 0, 'a positive whole number'),
  datasetPath: optionalText('datasetPath', 400),
  frequencyHz: optionalNumber('frequencyHz', (v) => v > 0, 'a number greater than 0'),
  fftLength: optionalNumber(
    'fftLength',
    (v) => Number.isInteger(v) && v >= 2 && v <= 65536 && (v & (v - 1)) === 0,
    'a power of two from 2 to 65536',
  ),
  hop: optionalNumber('hop', (v) => Number.isInteger(v) && v >= 1 && v <= 1 << 20, 'a whole number of samples ≥ 1'),
  window: z
    .string()
    .trim()
    .optional()
    .transform((v, ctx) => {
      if (v === undefined || v === '') return undefined;
      if (v === 'hann' || v === 'hamming' || v === 'rectangular') return v;
      ctx.addIssue({
        code: 'custom',
        message: `window must be hann, hamming or rectangular (got '${v.slice(0, 40)}')`,
      });
      return z.NEVER;
    }),
});

export type DatasetUploadFields = z.infer<typeof datasetUploadFieldsSchema>;

/** The multipart body, described for OpenAPI (the route reads it with busboy, not zod). */
export const datasetUploadFormSchema = z.object({
  file: z.string().meta({ format: 'binary', description: 'The snapshot file: .csv .txt .npy .h5 .hdf5 .wav' }),
  name: z.string().max(200).optional(),
  arrayId: z
    .int()
    .positive()
    .optional()
    .meta({ description: 'An array of your team; its element count must equal the file’s column count' }),
  datasetPath: z.string().optional().meta({ description: 'HDF5: path of the dataset inside the file' }),
  frequencyHz: z.number().positive().optional().meta({ description: 'WAV: analysis frequency (required for WAV)' }),
  fftLength: z
    .int()
    .min(2)
    .max(65536)
    .optional()
    .meta({ description: 'WAV: FFT length, a power of two (default 1024)' }),
  hop: z.int().min(1).optional().meta({ description: 'WAV: hop in samples (default = fftLength)' }),
  window: z
    .enum(['hann', 'hamming', 'rectangular'])
    .optional()
    .meta({ description: 'WAV: periodic window (default hann)' }),
});

export const datasetCreatedSchema = z.object({
  id: z.int(),
  name: z.string(),
  format: z.enum(['csv', 'npy', 'hdf5', 'wav']),
  elements: z.int(),
  snapshots: z.int(),
  sha256: z.string().meta({ description: 'Hex SHA-256 of the uploaded bytes as received' }),
});

export const datasetSchema = datasetCreatedSchema.extend({
  bytes: z.int(),
  originalName: z.string(),
  arrayId: z.int().nullable(),
  options: z.record(z.string(), z.unknown()).nullable(),
  uploadedBy: z.object({ id: z.int(), name: z.string() }).nullable(),
  createdAt: z.string(),
  summary: z
    .object({
      channelPowerDb: z.array(z.number()),
      eigenvalues: z.array(z.number()),
      mdl: z.array(z.number()),
      aic: z.array(z.number()),
      mdlChoice: z.int(),
      aicChoice: z.int(),
      covarianceMagnitude: z.array(z.array(z.number())).nullable(),
      preview: z.object({ re: z.array(z.array(z.number())), im: z.array(z.array(z.number())) }),
    })
    .nullable()
    .meta({
      description:
        'Computed at upload: per-channel power, sample-covariance eigenvalues with the MDL/AIC curves, |R| (M ≤ 128) and the first snapshots',
    }),
});
