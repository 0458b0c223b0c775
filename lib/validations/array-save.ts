/**
 * Saving an array input as a revision: validation with per-field 422s,
 * the merge a partial PATCH makes with the latest config, and the resolved
 * columns a revision row stores. Pure (no database, no server-only), so the
 * demo seed uses the same path as the API.
 */
import { ApiError, type FieldErrors } from '@/lib/http';
import { MAX_ELEMENTS, arrayInputSchema, resolveArrayGeometry, type ArrayInput, type ResolvedGeometry } from './array';

/** Largest resolved spacing the server accepts, in wavelengths (keeps the figures cheap and the canvas drawable). */
export const MAX_SPACING_WAVELENGTHS = 1000;

function validationError(fields: FieldErrors): ApiError {
  const [field, messages] = Object.entries(fields)[0];
  return new ApiError('validation_failed', `${field === '_' ? 'body' : field}: ${messages[0]}`, { fields });
}

/**
 * Validates an array input: 422 with `fields` keyed by the dotted path of
 * each problem (`spacing.value`, `elementStates.3.gainDb`), so a form can put
 * each message under its own input. Beyond the schema it refuses a spacing of
 * more than MAX_SPACING_WAVELENGTHS once resolved, and a propagationSpeedMps
 * that disagrees with the medium (send one or the other, or make them agree).
 */
export function validateArrayInput(raw: unknown): { input: ArrayInput; geometry: ResolvedGeometry } {
  if (typeof raw !== 'object' || raw === null || Array.isArray(raw)) {
    throw validationError({ _: ['the body must be a JSON object describing the array'] });
  }
  const parsed = arrayInputSchema.safeParse(raw);
  if (!parsed.success) {
    const fields: FieldErrors = {};
    for (const issue of parsed.error.issues) {
      const key = issue.path.length ? issue.path.map(String).join('.') : '_';
      (fields[key] ??= []).push(issue.message);
    }
    throw validationError(fields);
  }
  const input = parsed.data;
  const geometry = resolveArrayGeometry(input);
  const disagreement = geometry.warnings.find((w) => w.code === 'speed-differs-from-medium');
  if (disagreement) {
    throw validationError({
      propagationSpeedMps: [
        `${disagreement.message.replace('; the given speed is used', '')}: send either propagationSpeedMps or a medium, or make them agree`,
      ],
    });
  }
  if (!(geometry.spacingWavelengths <= MAX_SPACING_WAVELENGTHS)) {
    const at =
      input.spacing.unit === 'wavelength'
        ? ''
        : ` (${input.spacing.value} ${input.spacing.unit} at λ = ${geometry.wavelengthM} m)`;
    throw validationError({
      'spacing.value': [
        `spacing.value is ${geometry.spacingWavelengths} wavelengths${at}; at most ${MAX_SPACING_WAVELENGTHS} wavelengths are supported`,
      ],
    });
  }
  return { input, geometry };
}

/** The columns of an array_revisions row for a validated input. */
export function revisionColumns(input: ArrayInput, geometry: ResolvedGeometry) {
  return {
    config: input as unknown as Record<string, unknown>,
    elements: input.elements,
    spacingWavelengths: geometry.spacingWavelengths,
    frequencyHz: input.frequencyHz ?? null,
    propagationSpeedMps: geometry.speedMps ?? null,
  };
}

/**
 * The latest config with a partial change applied. Top-level keys replace
 * the old ones; `null` removes an optional key. Two conveniences keep a
 * partial change coherent: a new `elements` without `elementStates` resizes
 * the old per-element states (new elements enabled, 0 dB, 0°), and a new
 * `medium` without `propagationSpeedMps` (or the reverse) drops the old one,
 * so the speed follows what was changed.
 */
export function mergeArrayInput(previous: ArrayInput, patch: Record<string, unknown>): Record<string, unknown> {
  const merged: Record<string, unknown> = { ...previous };
  for (const [key, value] of Object.entries(patch)) {
    if (value === null && !['name', 'elements', 'spacing'].includes(key)) delete merged[key];
    else merged[key] = value;
  }
  if ('medium' in patch && !('propagationSpeedMps' in patch)) delete merged.propagationSpeedMps;
  if ('propagationSpeedMps' in patch && !('medium' in patch)) delete merged.medium;
  const states = previous.elementStates;
  const n = patch.elements;
  if (
    'elements' in patch &&
    !('elementStates' in patch) &&
    states &&
    typeof n === 'number' &&
    Number.isInteger(n) &&
    n >= 0 &&
    n <= MAX_ELEMENTS
  ) {
    const resized = states.slice(0, n).map((s) => ({ ...s }));
    while (resized.length < n) resized.push({ enabled: true, gainDb: 0, phaseDeg: 0 });
    merged.elementStates = resized;
  }
  return merged;
}

/** 422 for a body that is not a JSON object. */
export function requireObjectBody(body: unknown, what: string): Record<string, unknown> {
  if (typeof body !== 'object' || body === null || Array.isArray(body))
    throw validationError({ _: [`the body must be a JSON object ${what}`] });
  return body as Record<string, unknown>;
}
