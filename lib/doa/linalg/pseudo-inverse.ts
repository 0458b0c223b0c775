/**
 * Moore–Penrose pseudo-inverse and minimum-norm least squares, from the SVD
 * (svd.ts): pinv(A) = V·diag(1/s)·Uᴴ over the singular values kept.
 *
 * Cut-offs (stated so results match numpy):
 *  - pseudoInverse: s ≤ rcond·s_max is dropped, rcond = 1e−15 by default
 *    (numpy.linalg.pinv default).
 *  - leastSquares:  s ≤ ε·max(m, n)·s_max is dropped (numpy.linalg.lstsq with
 *    rcond=None).
 * Layout: ComplexMatrix (split re/im, row-major). Inputs are not mutated.
 */
import { ComplexMatrix, multiply, zeros } from './complex';
import { DoaInputError } from '../errors';
import { svd } from './svd';

export function pseudoInverse(a: ComplexMatrix, rcond = 1e-15): ComplexMatrix {
  if (!(rcond >= 0) || !Number.isFinite(rcond))
    throw new DoaInputError('bad-option', `pseudoInverse: rcond ${rcond} is not a finite number ≥ 0`);
  return pinvWithCutoff(a, rcond);
}

/** The X minimising ‖A·X − B‖_F, of least norm when A is rank-deficient. */
export function leastSquares(a: ComplexMatrix, b: ComplexMatrix): ComplexMatrix {
  if (a.rows !== b.rows) {
    throw new DoaInputError('bad-size', `leastSquares: A is ${a.rows} × ${a.cols} but B has ${b.rows} rows`);
  }
  return multiply(pinvWithCutoff(a, Number.EPSILON * Math.max(a.rows, a.cols)), b);
}

function pinvWithCutoff(a: ComplexMatrix, rcond: number): ComplexMatrix {
  const m = a.rows;
  const n = a.cols;
  const out = zeros(n, m);
  if (m === 0 || n === 0) return out;
  const { u, s, v } = svd(a);
  const r = s.length;
  const cutoff = rcond * s[0];
  for (let k = 0; k < r; k++) {
    if (!(s[k] > cutoff)) break;
    const inv = 1 / s[k];
    // out += v_k · (1/s_k) · u_kᴴ
    for (let i = 0; i < n; i++) {
      const vr = v.re[i * n + k] * inv;
      const vi = v.im[i * n + k] * inv;
      if (vr === 0 && vi === 0) continue;
      for (let j = 0; j < m; j++) {
        const ur = u.re[j * r + k];
        const ui = -u.im[j * r + k];
        out.re[i * m + j] += vr * ur - vi * ui;
        out.im[i * m + j] += vr * ui + vi * ur;
      }
    }
  }
  return out;
}
