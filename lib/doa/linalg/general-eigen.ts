/**
 * Eigenvalues of a general (non-Hermitian) complex square matrix.
 *
 * Method: balancing by powers of two (Parlett & Reinsch, Numer. Math. 13,
 * 1969; LAPACK xGEBAL without permutations), Householder reduction to upper
 * Hessenberg form, then the single-shift complex QR algorithm with Wilkinson
 * shifts and deflation on negligible subdiagonals (Golub & Van Loan, Matrix
 * Computations, 4th ed., §7.5; EISPACK comqr). Exceptional shifts after 10
 * and 20 iterations without deflation.
 *
 * Used for ESPRIT's K × K matrix Ψ (and Υ, real, passed with a zero imaginary
 * part) and for polynomial roots through the companion matrix. Eigenvalues
 * only; their order is unspecified (callers sort what they need).
 * Layout: ComplexMatrix (split re/im, row-major); the result is a
 * ComplexVector of length n. The input is not mutated.
 */
import { requireFiniteEntries, requireSquare } from '../checks';
import { ComplexMatrix, ComplexVector } from './complex';
import { DoaNumericalError } from '../errors';

export function generalEigenvalues(a: ComplexMatrix): ComplexVector {
  requireSquare(a, 'generalEigenvalues');
  requireFiniteEntries(a.re, 'generalEigenvalues: real part');
  requireFiniteEntries(a.im, 'generalEigenvalues: imaginary part');
  const n = a.rows;
  const hr = a.re.slice();
  const hi = a.im.slice();
  balanceInPlace(hr, hi, n);
  hessenbergInPlace(hr, hi, n);
  return hessenbergQrEigenvalues(hr, hi, n);
}

/** Eigenvalues of a real general matrix (n × n row-major), as complex numbers. */
export function realGeneralEigenvalues(a: Float64Array, n: number): ComplexVector {
  return generalEigenvalues({ rows: n, cols: n, re: a, im: new Float64Array(a.length) });
}

/**
 * Eigenvalues of an upper Hessenberg matrix given in (hr, hi), which are
 * overwritten. Exported for the companion-matrix root finder.
 */
export function hessenbergQrEigenvalues(hr: Float64Array, hi: Float64Array, n: number): ComplexVector {
  const outRe = new Float64Array(n);
  const outIm = new Float64Array(n);
  const eps = Number.EPSILON;
  const cr = new Float64Array(n);
  const cs = new Float64Array(n * 2);
  let hiIdx = n - 1;
  let iter = 0;
  let totalIter = 0;
  while (hiIdx >= 0) {
    if (hiIdx === 0) {
      outRe[0] = hr[0];
      outIm[0] = hi[0];
      break;
    }
    // Find the start of the active unreduced block.
    let l = hiIdx;
    while (l > 0) {
      const sub = Math.abs(hr[l * n + l - 1]) + Math.abs(hi[l * n + l - 1]);
      let ref =
        Math.abs(hr[(l - 1) * n + l - 1]) +
        Math.abs(hi[(l - 1) * n + l - 1]) +
        Math.abs(hr[l * n + l]) +
        Math.abs(hi[l * n + l]);
      if (ref === 0) {
        // Fall back to the block's scale so an exactly zero diagonal still deflates sensibly.
        ref = blockScale(hr, hi, n, l - 1, hiIdx);
      }
      if (sub <= eps * ref) {
        hr[l * n + l - 1] = 0;
        hi[l * n + l - 1] = 0;
        break;
      }
      l--;
    }
    if (l === hiIdx) {
      outRe[hiIdx] = hr[hiIdx * n + hiIdx];
      outIm[hiIdx] = hi[hiIdx * n + hiIdx];
      hiIdx--;
      iter = 0;
      continue;
    }
    if (++totalIter > 60 * n) {
      throw new DoaNumericalError('no-convergence', `complex QR did not converge for a ${n} × ${n} matrix`);
    }
    iter++;
    // Shift.
    let mur: number;
    let mui: number;
    const a11r = hr[(hiIdx - 1) * n + hiIdx - 1];
    const a11i = hi[(hiIdx - 1) * n + hiIdx - 1];
    const a12r = hr[(hiIdx - 1) * n + hiIdx];
    const a12i = hi[(hiIdx - 1) * n + hiIdx];
    const a21r = hr[hiIdx * n + hiIdx - 1];
    const a21i = hi[hiIdx * n + hiIdx - 1];
    const a22r = hr[hiIdx * n + hiIdx];
    const a22i = hi[hiIdx * n + hiIdx];
    if (iter % 10 === 0) {
      // Exceptional shift (EISPACK comqr style).
      mur = Math.abs(a21r) + Math.abs(hr[(hiIdx - 1) * n + Math.max(hiIdx - 2, 0)]);
      mui = Math.abs(a21i) + Math.abs(hi[(hiIdx - 1) * n + Math.max(hiIdx - 2, 0)]);
      mur += a22r;
      mui += a22i;
    } else {
      // Eigenvalue of the trailing 2 × 2 block closest to a22: mid ± sqrt(((a11−a22)/2)² + a12·a21).
      const hr2 = 0.5 * (a11r - a22r);
      const hi2 = 0.5 * (a11i - a22i);
      const dr = hr2 * hr2 - hi2 * hi2 + (a12r * a21r - a12i * a21i);
      const di = 2 * hr2 * hi2 + (a12r * a21i + a12i * a21r);
      const [sr, si] = complexSqrt(dr, di);
      const midr = 0.5 * (a11r + a22r);
      const midi = 0.5 * (a11i + a22i);
      const e1r = midr + sr;
      const e1i = midi + si;
      const e2r = midr - sr;
      const e2i = midi - si;
      if (Math.hypot(e1r - a22r, e1i - a22i) <= Math.hypot(e2r - a22r, e2i - a22i)) {
        mur = e1r;
        mui = e1i;
      } else {
        mur = e2r;
        mui = e2i;
      }
    }
    // Explicit shifted QR step on the active block l…hiIdx.
    for (let k = l; k <= hiIdx; k++) {
      hr[k * n + k] -= mur;
      hi[k * n + k] -= mui;
    }
    for (let k = l; k < hiIdx; k++) {
      const xr = hr[k * n + k];
      const xi = hi[k * n + k];
      const yr = hr[(k + 1) * n + k];
      const yi = hi[(k + 1) * n + k];
      const xa = Math.hypot(xr, xi);
      const r = Math.hypot(xa, Math.hypot(yr, yi));
      let c: number;
      let sr: number;
      let si: number;
      if (r === 0) {
        c = 1;
        sr = 0;
        si = 0;
      } else if (xa === 0) {
        c = 0;
        sr = yr / r;
        si = -yi / r;
      } else {
        c = xa / r;
        // s = (x/|x|)·conj(y)/r
        const ur = xr / xa;
        const ui = xi / xa;
        sr = (ur * yr + ui * yi) / r;
        si = (ui * yr - ur * yi) / r;
      }
      cr[k] = c;
      cs[2 * k] = sr;
      cs[2 * k + 1] = si;
      // Rows k, k+1 over columns k…hiIdx: [c s; −conj(s) c].
      for (let j = k; j <= hiIdx; j++) {
        const pr = hr[k * n + j];
        const pim = hi[k * n + j];
        const qr = hr[(k + 1) * n + j];
        const qi = hi[(k + 1) * n + j];
        hr[k * n + j] = c * pr + (sr * qr - si * qi);
        hi[k * n + j] = c * pim + (sr * qi + si * qr);
        hr[(k + 1) * n + j] = -(sr * pr + si * pim) + c * qr;
        hi[(k + 1) * n + j] = -(sr * pim - si * pr) + c * qi;
      }
    }
    for (let k = l; k < hiIdx; k++) {
      const c = cr[k];
      const sr = cs[2 * k];
      const si = cs[2 * k + 1];
      // Columns k, k+1 over rows l…min(k+2, hiIdx), times Gᴴ = [c −s; conj(s) c].
      const rowEnd = Math.min(k + 2, hiIdx);
      for (let i = l; i <= rowEnd; i++) {
        const pr = hr[i * n + k];
        const pim = hi[i * n + k];
        const qr = hr[i * n + k + 1];
        const qi = hi[i * n + k + 1];
        hr[i * n + k] = c * pr + (sr * qr + si * qi);
        hi[i * n + k] = c * pim + (sr * qi - si * qr);
        hr[i * n + k + 1] = -(sr * pr - si * pim) + c * qr;
        hi[i * n + k + 1] = -(sr * pim + si * pr) + c * qi;
      }
    }
    for (let k = l; k <= hiIdx; k++) {
      hr[k * n + k] += mur;
      hi[k * n + k] += mui;
    }
  }
  return { re: outRe, im: outIm };
}

function blockScale(hr: Float64Array, hi: Float64Array, n: number, lo: number, hiIdx: number): number {
  let s = 0;
  for (let i = lo; i <= hiIdx; i++)
    for (let j = Math.max(lo, i - 1); j <= hiIdx; j++)
      s = Math.max(s, Math.abs(hr[i * n + j]) + Math.abs(hi[i * n + j]));
  return s;
}

export function complexSqrt(re: number, im: number): [number, number] {
  const m = Math.hypot(re, im);
  if (m === 0) return [0, 0];
  let sr = Math.sqrt(0.5 * (m + Math.abs(re)));
  let si = im / (2 * sr);
  if (re < 0) {
    const t = sr;
    sr = Math.abs(si);
    si = im >= 0 ? t : -t;
  }
  return [sr, si];
}

/** Diagonal similarity scaling by powers of two so that row and column norms are comparable. */
export function balanceInPlace(hr: Float64Array, hi: Float64Array, n: number): void {
  const radix = 2;
  let done = false;
  let guard = 0;
  while (!done && guard++ < 100) {
    done = true;
    for (let i = 0; i < n; i++) {
      let c = 0;
      let r = 0;
      for (let j = 0; j < n; j++) {
        if (j === i) continue;
        c += Math.abs(hr[j * n + i]) + Math.abs(hi[j * n + i]);
        r += Math.abs(hr[i * n + j]) + Math.abs(hi[i * n + j]);
      }
      if (c === 0 || r === 0) continue;
      let g = r / radix;
      let f = 1;
      const s = c + r;
      while (c < g) {
        f *= radix;
        c *= radix * radix;
      }
      g = r * radix;
      while (c >= g) {
        f /= radix;
        c /= radix * radix;
      }
      if ((c + r) / f < 0.95 * s) {
        done = false;
        const inv = 1 / f;
        for (let j = 0; j < n; j++) {
          hr[i * n + j] *= inv;
          hi[i * n + j] *= inv;
        }
        for (let j = 0; j < n; j++) {
          hr[j * n + i] *= f;
          hi[j * n + i] *= f;
        }
      }
    }
  }
}

/** Householder reduction of a general complex matrix to upper Hessenberg form (similarity, in place). */
export function hessenbergInPlace(hr: Float64Array, hi: Float64Array, n: number): void {
  const vr = new Float64Array(n);
  const vi = new Float64Array(n);
  for (let k = 0; k < n - 2; k++) {
    let tail2 = 0;
    for (let i = k + 2; i < n; i++) tail2 += hr[i * n + k] * hr[i * n + k] + hi[i * n + k] * hi[i * n + k];
    if (tail2 === 0) continue;
    const x0r = hr[(k + 1) * n + k];
    const x0i = hi[(k + 1) * n + k];
    const x0a = Math.hypot(x0r, x0i);
    const xnorm = Math.sqrt(tail2 + x0a * x0a);
    const phr = x0a === 0 ? 1 : x0r / x0a;
    const phi = x0a === 0 ? 0 : x0i / x0a;
    vr[k + 1] = x0r + phr * xnorm;
    vi[k + 1] = x0i + phi * xnorm;
    for (let i = k + 2; i < n; i++) {
      vr[i] = hr[i * n + k];
      vi[i] = hi[i * n + k];
    }
    const tau = 2 / (tail2 + vr[k + 1] * vr[k + 1] + vi[k + 1] * vi[k + 1]);
    // Left: H ← (I − τ v vᴴ) H, columns k…n−1.
    for (let j = k; j < n; j++) {
      let sr = 0;
      let si = 0;
      for (let i = k + 1; i < n; i++) {
        sr += vr[i] * hr[i * n + j] + vi[i] * hi[i * n + j];
        si += vr[i] * hi[i * n + j] - vi[i] * hr[i * n + j];
      }
      sr *= tau;
      si *= tau;
      for (let i = k + 1; i < n; i++) {
        hr[i * n + j] -= vr[i] * sr - vi[i] * si;
        hi[i * n + j] -= vr[i] * si + vi[i] * sr;
      }
    }
    // Right: H ← H (I − τ v vᴴ), all rows.
    for (let i = 0; i < n; i++) {
      let sr = 0;
      let si = 0;
      const row = i * n;
      for (let j = k + 1; j < n; j++) {
        sr += hr[row + j] * vr[j] - hi[row + j] * vi[j];
        si += hr[row + j] * vi[j] + hi[row + j] * vr[j];
      }
      sr *= tau;
      si *= tau;
      for (let j = k + 1; j < n; j++) {
        // −= s·conj(v_j)
        hr[row + j] -= sr * vr[j] + si * vi[j];
        hi[row + j] -= si * vr[j] - sr * vi[j];
      }
    }
    for (let i = k + 2; i < n; i++) {
      hr[i * n + k] = 0;
      hi[i * n + k] = 0;
    }
  }
}
