/**
 * POST /api/v1/arrays/{id}/calibrations body, shared by the route handler, the
 * calibration panel and the OpenAPI document. Two forms: one reference
 * `{datasetId, bearingsDeg, …}` or several fitted jointly `{references:[…], …}`.
 * Messages name their field; 422 `fields` are keyed by dotted path
 * (`bearingsDeg.1`, `references.0.datasetId`).
 */
import { z } from 'zod';
import { ApiError, type FieldErrors } from '@/lib/http';
import { CALIBRATION_METHODS } from '@/lib/doa/calibration/report';

export const MAX_CALIBRATION_REFERENCES = 8;
export const MAX_CALIBRATION_BEARINGS = 16;

const id = (field: string) =>
  z
    .number({ error: `${field} must be a dataset id (a whole number)` })
    .int({ error: `${field} must be a whole number` })
    .min(1, { error: `${field} must be a positive id` });

const bearing = (field: string) =>
  z
    .number({ error: `${field} must be a number of degrees` })
    .refine(Number.isFinite, { error: `${field} must be finite` })
    .refine((v) => v >= -90 && v <= 90, { error: `${field} must lie between −90° and 90° (from broadside)` });

const bearings = (field: string) =>
  z
    .array(bearing(`${field}[]`), { error: `${field} must be a list of bearings in degrees` })
    .min(1, { error: `${field} needs at least one known bearing` })
    .max(MAX_CALIBRATION_BEARINGS, { error: `${field}: at most ${MAX_CALIBRATION_BEARINGS} bearings` });

export const calibrationReferenceSchema = z.object({
  datasetId: id('references[].datasetId'),
  bearingsDeg: bearings('references[].bearingsDeg'),
});

export const calibrationMethodSchema = z.enum(CALIBRATION_METHODS, {
  error: `method must be one of ${CALIBRATION_METHODS.join(', ')}`,
});

export const calibrationRequestSchema = z
  .object({
    datasetId: id('datasetId').optional(),
    bearingsDeg: bearings('bearingsDeg').optional(),
    references: z
      .array(calibrationReferenceSchema, { error: 'references must be a list of {datasetId, bearingsDeg}' })
      .min(1, { error: 'references needs at least one reference' })
      .max(MAX_CALIBRATION_REFERENCES, { error: `references: at most ${MAX_CALIBRATION_REFERENCES}` })
      .optional(),
    frequencyHz: z
      .number({ error: 'frequencyHz must be a number of hertz' })
      .refine((v) => Number.isFinite(v) && v > 0, { error: 'frequencyHz must be a positive number of hertz' })
      .optional(),
    method: calibrationMethodSchema.optional(),
    /** Create the new array revision at once (default true; the panel previews with false, then accepts). */
    accept: z.boolean({ error: 'accept must be true or false' }).optional(),
  })
  .strict()
  .superRefine((v, ctx) => {
    const single = v.datasetId !== undefined || v.bearingsDeg !== undefined;
    if (single && v.references !== undefined) {
      ctx.addIssue({
        code: 'custom',
        path: ['references'],
        message: 'give either datasetId with bearingsDeg (one reference) or references (several), not both',
      });
    } else if (!single && v.references === undefined) {
      ctx.addIssue({
        code: 'custom',
        path: ['datasetId'],
        message: 'datasetId (with bearingsDeg) or references is required',
      });
    } else if (single) {
      if (v.datasetId === undefined)
        ctx.addIssue({ code: 'custom', path: ['datasetId'], message: 'datasetId is required with bearingsDeg' });
      if (v.bearingsDeg === undefined)
        ctx.addIssue({
          code: 'custom',
          path: ['bearingsDeg'],
          message: 'bearingsDeg (the known bearings in the recording) is required',
        });
    }
  });

export type CalibrationRequest = z.infer<typeof calibrationRequestSchema>;

/** One list of references whatever the form, with the field prefix each reference's errors use. */
export function referencesOf(input: CalibrationRequest): { datasetId: number; bearingsDeg: number[]; field: string }[] {
  if (input.references) return input.references.map((r, i) => ({ ...r, field: `references.${i}` }));
  return [{ datasetId: input.datasetId!, bearingsDeg: input.bearingsDeg!, field: '' }];
}

/** The dotted field of a reference's member: `datasetId` for the single form, `references.2.datasetId` otherwise. */
export function referenceField(prefix: string, member: string): string {
  return prefix ? `${prefix}.${member}` : member;
}

/**
 * Parses a request body: 422 with `fields` keyed by the dotted path of each problem
 * (`bearingsDeg.1`, `references.0.datasetId`), the first one named in the message.
 */
export function parseCalibrationRequest(raw: unknown): CalibrationRequest {
  if (typeof raw !== 'object' || raw === null || Array.isArray(raw))
    throw new ApiError('validation_failed', 'body: the body must be a JSON object', {
      fields: { _: ['the body must be a JSON object'] },
    });
  const parsed = calibrationRequestSchema.safeParse(raw);
  if (parsed.success) return parsed.data;
  const fields: FieldErrors = {};
  for (const issue of parsed.error.issues) {
    const key = issue.path.length ? issue.path.map(String).join('.') : '_';
    const message = issue.message.replace(/^(references\[\]\.)?(datasetId|bearingsDeg)(\[\])?/, key);
    (fields[key] ??= []).push(message);
  }
  const [field, messages] = Object.entries(fields)[0];
  const text = messages[0].startsWith(field) ? messages[0] : `${field === '_' ? 'body' : field}: ${messages[0]}`;
  throw new ApiError('validation_failed', text, { fields });
}
