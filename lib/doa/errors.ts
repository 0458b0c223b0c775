/**
 * Typed errors thrown by the bearing-estimation library.
 *
 * `DoaInputError` means the caller passed something the library will not
 * compute with (wrong size, NaN, a source count that does not fit). Its
 * `code` is stable and its message names the offending argument, so the
 * web layer can map it to a 422 answer without parsing text.
 * `DoaNumericalError` means the input was well-formed but the computation
 * could not proceed (a singular matrix, an eigen-solver that did not converge).
 */
export type DoaInputErrorCode =
  'bad-size' | 'not-finite' | 'too-few-elements' | 'bad-spacing' | 'bad-source-count' | 'bad-option' | 'bad-value';

export type DoaNumericalErrorCode = 'singular-matrix' | 'no-convergence';

export class DoaInputError extends RangeError {
  readonly code: DoaInputErrorCode;
  constructor(code: DoaInputErrorCode, message: string) {
    super(message);
    this.name = 'DoaInputError';
    this.code = code;
  }
}

export class DoaNumericalError extends Error {
  readonly code: DoaNumericalErrorCode;
  constructor(code: DoaNumericalErrorCode, message: string) {
    super(message);
    this.name = 'DoaNumericalError';
    this.code = code;
  }
}
