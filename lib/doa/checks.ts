/**
 * The one set of entry checks of lib/doa. Every public function of the library checks its
 * arguments with these; each check throws a DoaInputError whose message names the argument
 * (as the caller spells it) and the offending value, so the web layer can answer 422 with it.
 * Scalar checks return the checked value; array and matrix checks return nothing or a copy.
 */
import { DoaInputError } from './errors';
import type { ComplexMatrix } from './linalg/complex';

/** A finite number (NaN and ±Inf rejected). */
export function requireFinite(value: unknown, name: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new DoaInputError('not-finite', `${name} must be a finite number, got ${String(value)}`);
  }
  return value;
}

/** A finite number strictly greater than zero. */
export function requirePositive(value: unknown, name: string): number {
  const v = requireFinite(value, name);
  if (!(v > 0)) throw new DoaInputError('bad-value', `${name} must be greater than 0, got ${v}`);
  return v;
}

/** A finite number ≥ 0. */
export function requireNonNegative(value: unknown, name: string): number {
  const v = requireFinite(value, name);
  if (v < 0) throw new DoaInputError('bad-value', `${name} must be 0 or more, got ${v}`);
  return v;
}

/** A finite number in [lo, hi]. */
export function requireInRange(value: unknown, name: string, lo: number, hi: number): number {
  const v = requireFinite(value, name);
  if (v < lo || v > hi) throw new DoaInputError('bad-value', `${name} must lie in [${lo}, ${hi}], got ${v}`);
  return v;
}

/** Largest element count the figures accept (keeps O(M²) paths bounded). */
export const MAX_FIGURE_ELEMENTS = 4096;

/** Element count: an integer in [2, MAX_FIGURE_ELEMENTS]. */
export function requireElementCount(value: unknown, name = 'elements'): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new DoaInputError('not-finite', `${name} must be a finite integer, got ${String(value)}`);
  }
  if (!Number.isInteger(value)) throw new DoaInputError('bad-value', `${name} must be an integer, got ${value}`);
  if (value < 2) throw new DoaInputError('too-few-elements', `${name} must be at least 2, got ${value}`);
  if (value > MAX_FIGURE_ELEMENTS)
    throw new DoaInputError('bad-value', `${name} must be at most ${MAX_FIGURE_ELEMENTS}, got ${value}`);
  return value;
}

/** Element spacing in wavelengths: finite and > 0. */
export function requireSpacing(value: unknown, name = 'spacingWavelengths'): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || !(value > 0)) {
    throw new DoaInputError('bad-spacing', `${name} must be a finite number of wavelengths > 0, got ${String(value)}`);
  }
  return value;
}

/** A bearing in degrees within [−90, 90]. */
export function requireBearing(value: unknown, name: string): number {
  return requireInRange(value, name, -90, 90);
}

/** A positive integer (snapshot counts and the like). */
export function requirePositiveInteger(value: unknown, name: string): number {
  const v = requireFinite(value, name);
  if (!Number.isInteger(v) || v < 1)
    throw new DoaInputError('bad-value', `${name} must be a positive integer, got ${v}`);
  return v;
}

/** An array-like of finite numbers of an optional exact length; returns a Float64Array copy. */
export function requireFiniteArray(value: unknown, name: string, length?: number): Float64Array {
  if (value === null || typeof value !== 'object' || typeof (value as ArrayLike<number>).length !== 'number') {
    throw new DoaInputError('bad-size', `${name} must be an array of numbers`);
  }
  const arr = value as ArrayLike<unknown>;
  if (length !== undefined && arr.length !== length) {
    throw new DoaInputError('bad-size', `${name} has ${arr.length} entries, expected ${length}`);
  }
  const out = new Float64Array(arr.length);
  for (let i = 0; i < arr.length; i++) {
    const v = arr[i];
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      throw new DoaInputError('not-finite', `${name}[${i}] must be a finite number, got ${String(v)}`);
    }
    out[i] = v;
  }
  return out;
}

/** Every entry of an array (or a typed array) is finite; `what` names the argument. */
export function requireFiniteEntries(values: ArrayLike<number>, what: string): void {
  for (let i = 0; i < values.length; i++) {
    if (!Number.isFinite(values[i])) {
      throw new DoaInputError('not-finite', `${what}: entry ${i} is ${values[i]}, not a finite number`);
    }
  }
}

/** A square matrix; `what` names the operation or argument. */
export function requireSquare(a: ComplexMatrix, what: string): void {
  if (a.rows !== a.cols) throw new DoaInputError('bad-size', `${what}: matrix is ${a.rows} × ${a.cols}, not square`);
}

/** Two matrices of the same size; `what` names the operation. */
export function requireSameSize(a: ComplexMatrix, b: ComplexMatrix, what: string): void {
  if (a.rows !== b.rows || a.cols !== b.cols) {
    throw new DoaInputError('bad-size', `${what}: ${a.rows} × ${a.cols} and ${b.rows} × ${b.cols} differ in size`);
  }
}
