/**
 * Eigendecomposition of a real symmetric matrix, A = V·diag(λ)·Vᵀ.
 *
 * Layout: `a` is n × n row-major (Float64Array, index origin 0); the result has
 * `values` in DESCENDING order and `vectors` n × n row-major with eigenvector j
 * in column j. The input is not mutated; (A + Aᵀ)/2 is used.
 *
 * This is the Hermitian routine (hermitian-eigen.ts) called with a zero
 * imaginary part: for real input its Householder vectors, the tridiagonal
 * phases and the QL rotations are all real, so the eigenvectors are exactly
 * real and no accuracy is lost. Used by Unitary ESPRIT.
 */
import { DoaInputError } from '../errors';
import { hermitianEigen } from './hermitian-eigen';

export interface SymmetricEigenResult {
  readonly values: Float64Array;
  readonly vectors: Float64Array;
}

export function symmetricEigen(a: Float64Array, n: number): SymmetricEigenResult {
  if (!Number.isInteger(n) || n < 0 || a.length !== n * n) {
    throw new DoaInputError('bad-size', `symmetricEigen: expected ${n} × ${n} = ${n * n} entries, got ${a.length}`);
  }
  const result = hermitianEigen({ rows: n, cols: n, re: a, im: new Float64Array(n * n) });
  return { values: result.values, vectors: result.vectors.re };
}
