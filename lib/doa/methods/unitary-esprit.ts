/**
 * Unitary ESPRIT (Haardt & Nossek, "Unitary ESPRIT: how to obtain increased
 * estimation accuracy with a reduced computational burden", IEEE Trans. SP
 * 43(5), 1995), computed from the covariance as docs/conventions.md §4 fixes:
 *  1. real EVD of Re(Q_Lᴴ·R·Q_L); Es = the K dominant eigenvectors (real);
 *  2. K1 = Re(Q_{L−1}ᴴ(J1+J2)Q_L), K2 = Re(Q_{L−1}ᴴ·j(J1−J2)·Q_L);
 *  3. Υ from K1·Es·Υ ≈ K2·Es by least squares;
 *  4. each eigenvalue ω_k of Υ gives μ_k = 2·atan(Re ω_k).
 * Q_n is the sparse left-Π-real unitary matrix:
 *   Q_{2n} = (1/√2)[[I, jI], [Π, −jΠ]],  Q_{2n+1} = (1/√2)[[I, 0, jI], [0ᵀ, √2, 0ᵀ], [Π, 0, −jΠ]].
 * Re(QᴴRQ) = Qᴴ·R_fb·Q, so forward–backward averaging is built in.
 */
import { ComplexMatrix, multiply, multiplyConjugateTransposeLeft, zeros } from '../linalg/complex';
import { bearingsFromElectricalAngles } from '../angles';
import { clipWarnings } from './esprit';
import { realGeneralEigenvalues } from '../linalg/general-eigen';
import { MethodInput, MethodOutput } from './types';
import { leastSquares } from '../linalg/pseudo-inverse';
import { symmetricEigen } from '../linalg/symmetric-eigen';

/** The left-Π-real unitary matrix Q_n (n × n). */
export function leftPiRealMatrix(n: number): ComplexMatrix {
  const q = zeros(n, n);
  const h = Math.floor(n / 2);
  const s = Math.SQRT1_2;
  for (let i = 0; i < h; i++) {
    q.re[i * n + i] = s; // I
    q.im[i * n + (n - h + i)] = s; // jI
    const r = n - h + i; // Π rows: row r has its 1 in column h−1−i
    q.re[r * n + (h - 1 - i)] = s;
    q.im[r * n + (n - h + (h - 1 - i))] = -s;
  }
  if (n % 2 === 1) q.re[h * n + h] = 1;
  return q;
}

export function unitaryEspritElectricalAngles(r: ComplexMatrix, sourceCount: number): Float64Array {
  const l = r.rows;
  const k = sourceCount;
  const ql = leftPiRealMatrix(l);
  const qs = leftPiRealMatrix(l - 1);
  const t = multiplyConjugateTransposeLeft(ql, multiply(r, ql));
  const evd = symmetricEigen(t.re, l);
  // Es (L × K) real
  const es = zeros(l, k);
  for (let i = 0; i < l; i++) for (let j = 0; j < k; j++) es.re[i * k + j] = evd.vectors[i * l + j];
  // J1 + J2 and j(J1 − J2), (L−1) × L
  const sum = zeros(l - 1, l);
  const dif = zeros(l - 1, l);
  for (let i = 0; i < l - 1; i++) {
    sum.re[i * l + i] += 1;
    sum.re[i * l + i + 1] += 1;
    dif.im[i * l + i] += 1;
    dif.im[i * l + i + 1] -= 1;
  }
  const k1 = realPart(multiplyConjugateTransposeLeft(qs, multiply(sum, ql)));
  const k2 = realPart(multiplyConjugateTransposeLeft(qs, multiply(dif, ql)));
  const upsilon = leastSquares(multiply(k1, es), multiply(k2, es));
  const omega = realGeneralEigenvalues(upsilon.re, k);
  const out = new Float64Array(k);
  for (let i = 0; i < k; i++) out[i] = 2 * Math.atan(omega.re[i]);
  return out;
}

function realPart(a: ComplexMatrix): ComplexMatrix {
  return { rows: a.rows, cols: a.cols, re: a.re.slice(), im: new Float64Array(a.re.length) };
}

export function runEspritUnitary(input: MethodInput): MethodOutput {
  if (input.sourceCount === 0) return { bearingsDeg: [], warnings: [] };
  const mus = unitaryEspritElectricalAngles(input.covariance, input.sourceCount);
  const { bearingsDeg, clippedCount } = bearingsFromElectricalAngles(mus, input.spacingWavelengths);
  return { bearingsDeg, warnings: clipWarnings(clippedCount, 'esprit-unitary') };
}
