/**
 * LS-ESPRIT and TLS-ESPRIT (Roy & Kailath, "ESPRIT — estimation of signal
 * parameters via rotational invariance techniques", IEEE Trans. ASSP 37(7),
 * 1989), with maximal-overlap subarrays as docs/conventions.md §4 fixes:
 * Es1 = rows 0 … L−2 and Es2 = rows 1 … L−1 of the signal subspace Es (L × K).
 *  - esprit-ls : Ψ = pinv(Es1)·Es2.
 *  - esprit-tls: V = right singular vectors of C = [Es1 Es2] (descending),
 *                split into K × K blocks, Ψ = −V12·V22⁻¹.
 * The eigenvalues λ_k of Ψ give μ_k = arg λ_k (radians), mapped to bearings
 * with the clip rule of docs/conventions.md §1.
 */
import { ComplexMatrix, inverse, multiply, scale, subMatrix, zeros } from '../linalg/complex';
import { bearingsFromElectricalAngles } from '../angles';
import { generalEigenvalues } from '../linalg/general-eigen';
import { MethodInput, MethodOutput } from './types';
import { pseudoInverse } from '../linalg/pseudo-inverse';
import { svd } from '../linalg/svd';
import { DoaWarning } from '../warnings';

/** The first K eigenvector columns (L × K). */
export function signalSubspace(vectors: ComplexMatrix, sourceCount: number): ComplexMatrix {
  return subMatrix(vectors, 0, vectors.rows, 0, sourceCount);
}

export function espritLsElectricalAngles(es: ComplexMatrix): Float64Array {
  const l = es.rows;
  const es1 = subMatrix(es, 0, l - 1, 0, es.cols);
  const es2 = subMatrix(es, 1, l, 0, es.cols);
  const psi = multiply(pseudoInverse(es1), es2);
  return phases(psi);
}

export function espritTlsElectricalAngles(es: ComplexMatrix): Float64Array {
  const l = es.rows;
  const k = es.cols;
  const c = zeros(l - 1, 2 * k);
  for (let i = 0; i < l - 1; i++) {
    for (let j = 0; j < k; j++) {
      c.re[i * 2 * k + j] = es.re[i * k + j];
      c.im[i * 2 * k + j] = es.im[i * k + j];
      c.re[i * 2 * k + k + j] = es.re[(i + 1) * k + j];
      c.im[i * 2 * k + k + j] = es.im[(i + 1) * k + j];
    }
  }
  const { v } = svd(c);
  const v12 = subMatrix(v, 0, k, k, 2 * k);
  const v22 = subMatrix(v, k, 2 * k, k, 2 * k);
  const psi = scale(multiply(v12, inverse(v22)), -1);
  return phases(psi);
}

function phases(psi: ComplexMatrix): Float64Array {
  const eig = generalEigenvalues(psi);
  const out = new Float64Array(eig.re.length);
  for (let i = 0; i < out.length; i++) out[i] = Math.atan2(eig.im[i], eig.re[i]);
  return out;
}

export function clipWarnings(clippedCount: number, method: string): DoaWarning[] {
  if (clippedCount === 0) return [];
  return [
    {
      code: 'angle-clipped',
      message: `${method}: ${clippedCount} electrical angle(s) exceeded ±2π·d and were clipped to ±90°; the bearing is unreliable (noise, too few snapshots, or spacing mismatch)`,
    },
  ];
}

function runFromAngles(input: MethodInput, method: string, angles: (es: ComplexMatrix) => Float64Array): MethodOutput {
  if (input.sourceCount === 0) return { bearingsDeg: [], warnings: [] };
  const es = signalSubspace(input.eigenvectors, input.sourceCount);
  const { bearingsDeg, clippedCount } = bearingsFromElectricalAngles(angles(es), input.spacingWavelengths);
  return { bearingsDeg, warnings: clipWarnings(clippedCount, method) };
}

export function runEspritLs(input: MethodInput): MethodOutput {
  return runFromAngles(input, 'esprit-ls', espritLsElectricalAngles);
}

export function runEspritTls(input: MethodInput): MethodOutput {
  return runFromAngles(input, 'esprit-tls', espritTlsElectricalAngles);
}
