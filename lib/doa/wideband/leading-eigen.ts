/**
 * All eigenvalues and only the K leading eigenvectors of a small complex Hermitian matrix,
 * for the per-bin covariances of a wideband block (MUSIC needs the signal subspace Es only:
 * its noise projector is I − Es·Esᴴ; MDL/AIC and the noise floor need the eigenvalues).
 *
 * Method:
 *  1. Householder reduction to Hermitian tridiagonal form and a unitary diagonal scaling to a
 *     real symmetric tridiagonal Tr, as linalg/hermitian-eigen.ts (rank-2 updates, computed
 *     on and above the diagonal and mirrored).
 *  2. Eigenvalues of Tr by implicit QL without vectors (the scheme of linalg/tridiagonal-ql.ts),
 *     descending. √(a² + b²) is taken by Math.sqrt rather than Math.hypot (much slower in
 *     V8), so eigenvalues agree with hermitianEigen's to rounding, not bit for bit.
 *  3. For each of the K largest eigenvalues λ_j, inverse iteration on Tr − λ_j·I (common
 *     practice, as in LAPACK's dstein: Gaussian elimination with partial pivoting on the
 *     tridiagonal, a tiny pivot replaced by ε·‖Tr‖₁, three solves from a fixed start vector,
 *     Gram–Schmidt against the vectors already found after every solve so that close or equal
 *     eigenvalues still give orthonormal vectors).
 *  4. Back-transformation y = Q·D·z of those K vectors only.
 * Cost for n = 16, K = 2: the Householder reduction plus O(n²) — about a third of the full
 * decomposition with vectors, whose QL rotations and back-transformation are O(n³).
 * The vectors agree with hermitianEigen's up to a unit phase each and rounding (residual
 * ‖(A − λI)y‖ of order ε·‖A‖), so Es·Esᴴ agrees with its projector to rounding.
 */
import { DoaNumericalError } from '../errors';

/**
 * √(a² + b²): Math.sqrt of the sum of squares, which is exact to rounding and several times
 * faster than Math.hypot in V8; Math.hypot only where the squares could overflow or underflow.
 */
function hyp(a: number, b: number): number {
  const s = a * a + b * b;
  return s > 1e-280 && s < 1e280 ? Math.sqrt(s) : Math.hypot(a, b);
}

/**
 * Eigenvalues (unsorted, into d) of the real symmetric tridiagonal (d, e[0 … n−2]) by implicit
 * QL with shifts, without vectors: the scheme of linalg/tridiagonal-ql.ts (Bowdler, Martin,
 * Reinsch & Wilkinson 1968, EISPACK tql1/tql2) with `hyp` for Math.hypot. e is overwritten.
 */
function tridiagonalQlValues(d: Float64Array, e: Float64Array, n: number): void {
  if (n <= 1) return;
  e[n - 1] = 0;
  const eps = Number.EPSILON;
  let f = 0;
  let tst1 = 0;
  for (let l = 0; l < n; l++) {
    tst1 = Math.max(tst1, Math.abs(d[l]) + Math.abs(e[l]));
    let m = l;
    while (m < n - 1) {
      if (Math.abs(e[m]) <= eps * tst1) break;
      m++;
    }
    if (m > l) {
      let iter = 0;
      do {
        if (++iter > 60) {
          throw new DoaNumericalError('no-convergence', `tridiagonal QL did not converge for eigenvalue ${l} of ${n}`);
        }
        let g = d[l];
        let p = (d[l + 1] - g) / (2 * e[l]);
        let r = hyp(p, 1);
        if (p < 0) r = -r;
        d[l] = e[l] / (p + r);
        d[l + 1] = e[l] * (p + r);
        const dl1 = d[l + 1];
        let h = g - d[l];
        for (let i = l + 2; i < n; i++) d[i] -= h;
        f += h;
        p = d[m];
        let c = 1;
        let c2 = c;
        let c3 = c;
        const el1 = e[l + 1];
        let s = 0;
        let s2 = 0;
        for (let i = m - 1; i >= l; i--) {
          c3 = c2;
          c2 = c;
          s2 = s;
          g = c * e[i];
          h = c * p;
          r = hyp(p, e[i]);
          e[i + 1] = s * r;
          s = e[i] / r;
          c = p / r;
          p = c * d[i] - s * g;
          d[i + 1] = h + s * (c * g + s * d[i]);
        }
        p = (-s * s2 * c3 * el1 * e[l]) / dl1;
        e[l] = s * p;
        d[l] = c * p;
      } while (Math.abs(e[l]) > eps * tst1);
    }
    d[l] = d[l] + f;
    e[l] = 0;
  }
}

export class LeadingEigenWorkspace {
  readonly n: number;
  private readonly ar: Float64Array;
  private readonly ai: Float64Array;
  private readonly hvr: Float64Array;
  private readonly hvi: Float64Array;
  private readonly tau: Float64Array;
  private readonly subRe: Float64Array;
  private readonly subIm: Float64Array;
  private readonly pr: Float64Array;
  private readonly pi: Float64Array;
  private readonly diag: Float64Array;
  private readonly off: Float64Array;
  private readonly td: Float64Array; // copies of Tr for the inverse iteration
  private readonly te: Float64Array;
  private readonly phRe: Float64Array;
  private readonly phIm: Float64Array;
  private readonly order: Int32Array;
  // Tridiagonal LU with partial pivoting (LAPACK dgttrf layout).
  private readonly lu: Float64Array;
  private readonly luUp1: Float64Array;
  private readonly luUp2: Float64Array;
  private readonly luLow: Float64Array;
  private readonly swapped: Uint8Array;
  /** Row j: eigenvector j of Tr (j < K). */
  private readonly z: Float64Array;

  constructor(n: number) {
    if (!Number.isInteger(n) || n < 1)
      throw new RangeError(`LeadingEigenWorkspace: size ${n} is not a positive integer`);
    this.n = n;
    this.ar = new Float64Array(n * n);
    this.ai = new Float64Array(n * n);
    this.hvr = new Float64Array(n * n);
    this.hvi = new Float64Array(n * n);
    this.tau = new Float64Array(n);
    this.subRe = new Float64Array(n);
    this.subIm = new Float64Array(n);
    this.pr = new Float64Array(n);
    this.pi = new Float64Array(n);
    this.diag = new Float64Array(n);
    this.off = new Float64Array(n);
    this.td = new Float64Array(n);
    this.te = new Float64Array(n);
    this.phRe = new Float64Array(n);
    this.phIm = new Float64Array(n);
    this.order = new Int32Array(n);
    this.lu = new Float64Array(n);
    this.luUp1 = new Float64Array(n);
    this.luUp2 = new Float64Array(n);
    this.luLow = new Float64Array(n);
    this.swapped = new Uint8Array(n);
    this.z = new Float64Array(n * n);
  }

  /**
   * Eigenvalues (descending) into `values` (n entries); eigenvectors 0 … k−1 (of the k largest
   * eigenvalues, unit norm) into ROWS 0 … k−1 of `esRe`/`esIm` (row-major k × n, row j =
   * vector j, entry i = element i). `re`/`im`: the row-major input, finite and n × n (not
   * checked, not mutated); it is used as (A + Aᴴ)/2.
   */
  decompose(
    re: ArrayLike<number>,
    im: ArrayLike<number>,
    values: Float64Array,
    k: number,
    esRe: Float64Array,
    esIm: Float64Array,
  ): void {
    this.tridiagonalise(re, im);
    const n = this.n;
    const { diag, off, td, te } = this;
    td.set(diag);
    te.set(off);
    tridiagonalQlValues(diag, off, n);
    // Descending, ties to the lower index (as hermitian-eigen.ts).
    const order = this.order;
    for (let j = 0; j < n; j++) {
      let p = j;
      while (p > 0) {
        const o = order[p - 1];
        if (diag[o] - diag[j] < 0 || (diag[o] - diag[j] === 0 && o > j)) {
          order[p] = o;
          p--;
        } else break;
      }
      order[p] = j;
    }
    for (let j = 0; j < n; j++) values[j] = diag[order[j]];
    const kk = Math.min(Math.max(0, k), n);
    for (let j = 0; j < kk; j++) this.inverseIteration(values[j], j);
    this.backTransform(kk, esRe, esIm);
  }

  /** Steps 1–2 of the header: Householder reduction, then Tr into diag/off and the phases. */
  private tridiagonalise(re: ArrayLike<number>, im: ArrayLike<number>): void {
    const n = this.n;
    const { ar, ai, hvr, hvi, tau, subRe, subIm, pr, pi } = this;
    for (let i = 0; i < n; i++) {
      ar[i * n + i] = re[i * n + i];
      ai[i * n + i] = 0;
      for (let k = i + 1; k < n; k++) {
        const r = 0.5 * (re[i * n + k] + re[k * n + i]);
        const m = 0.5 * (im[i * n + k] - im[k * n + i]);
        ar[i * n + k] = r;
        ai[i * n + k] = m;
        ar[k * n + i] = r;
        ai[k * n + i] = -m;
      }
    }
    // No clearing needed: row k of hvr/hvi is read only at entries k+1 … n−1 and only when
    // tau[k] ≠ 0 (both written then); pr/pi, subRe/subIm and tau[0 … n−3] are written before use.
    for (let k = 0; k < n - 2; k++) {
      const c0 = (k + 1) * n + k;
      let tail2 = 0;
      for (let i = k + 2; i < n; i++) tail2 += ar[i * n + k] * ar[i * n + k] + ai[i * n + k] * ai[i * n + k];
      const x0r = ar[c0];
      const x0i = ai[c0];
      if (tail2 === 0) {
        subRe[k] = x0r;
        subIm[k] = x0i;
        tau[k] = 0;
        continue;
      }
      const x0abs = hyp(x0r, x0i);
      const xnorm = Math.sqrt(tail2 + x0abs * x0abs);
      const phr = x0abs === 0 ? 1 : x0r / x0abs;
      const phi = x0abs === 0 ? 0 : x0i / x0abs;
      subRe[k] = -phr * xnorm;
      subIm[k] = -phi * xnorm;
      const vrow = k * n;
      hvr[vrow + k + 1] = x0r + phr * xnorm;
      hvi[vrow + k + 1] = x0i + phi * xnorm;
      for (let i = k + 2; i < n; i++) {
        hvr[vrow + i] = ar[i * n + k];
        hvi[vrow + i] = ai[i * n + k];
      }
      const v0abs2 = hvr[vrow + k + 1] * hvr[vrow + k + 1] + hvi[vrow + k + 1] * hvi[vrow + k + 1];
      const t = 2 / (tail2 + v0abs2);
      tau[k] = t;
      let vhp = 0;
      for (let i = k + 1; i < n; i++) {
        let sr = 0;
        let si = 0;
        const row = i * n;
        for (let j = k + 1; j < n; j++) {
          const mr = ar[row + j];
          const mi = ai[row + j];
          const vr = hvr[vrow + j];
          const vi = hvi[vrow + j];
          sr += mr * vr - mi * vi;
          si += mr * vi + mi * vr;
        }
        pr[i] = t * sr;
        pi[i] = t * si;
        vhp += hvr[vrow + i] * pr[i] + hvi[vrow + i] * pi[i];
      }
      const kk = 0.5 * t * vhp;
      for (let i = k + 1; i < n; i++) {
        pr[i] -= kk * hvr[vrow + i];
        pi[i] -= kk * hvi[vrow + i];
      }
      // A22 −= v·wᴴ + w·vᴴ on and above the diagonal; below it, the conjugate (exactly Hermitian).
      for (let i = k + 1; i < n; i++) {
        const vr = hvr[vrow + i];
        const vi = hvi[vrow + i];
        const wr = pr[i];
        const wi = pi[i];
        const row = i * n;
        for (let j = i; j < n; j++) {
          const vjr = hvr[vrow + j];
          const vji = hvi[vrow + j];
          const wjr = pr[j];
          const wji = pi[j];
          const xr = ar[row + j] - (vr * wjr + vi * wji + wr * vjr + wi * vji);
          const xi = ai[row + j] - (vi * wjr - vr * wji + wi * vjr - wr * vji);
          ar[row + j] = xr;
          ai[row + j] = xi;
          ar[j * n + i] = xr;
          ai[j * n + i] = -xi;
        }
      }
    }
    if (n >= 2) {
      subRe[n - 2] = ar[(n - 1) * n + (n - 2)];
      subIm[n - 2] = ai[(n - 1) * n + (n - 2)];
    }
    const { diag, off, phRe, phIm } = this;
    diag.fill(0);
    off.fill(0);
    phRe.fill(0);
    phIm.fill(0);
    phRe[0] = 1;
    for (let i = 0; i < n; i++) diag[i] = ar[i * n + i];
    for (let k = 0; k < n - 1; k++) {
      const m = hyp(subRe[k], subIm[k]);
      off[k] = m;
      const ur = m === 0 ? 1 : subRe[k] / m;
      const ui = m === 0 ? 0 : subIm[k] / m;
      phRe[k + 1] = phRe[k] * ur - phIm[k] * ui;
      phIm[k + 1] = phRe[k] * ui + phIm[k] * ur;
    }
  }

  /** Row j of this.z: the unit eigenvector of Tr (td, te) for eigenvalue lambda, orthogonal to rows 0 … j−1. */
  private inverseIteration(lambda: number, j: number): void {
    const n = this.n;
    const { td, te, lu, luUp1, luUp2, luLow, swapped, z } = this;
    const row = j * n;
    if (n === 1) {
      z[row] = 1;
      return;
    }
    let norm = 0;
    for (let i = 0; i < n; i++) {
      const s = Math.abs(td[i]) + (i > 0 ? Math.abs(te[i - 1]) : 0) + (i < n - 1 ? Math.abs(te[i]) : 0);
      if (s > norm) norm = s;
    }
    const tiny = Number.EPSILON * (norm > 0 ? norm : 1);
    // LU of Tr − λI with partial pivoting: U has diagonal lu, superdiagonals luUp1, luUp2.
    for (let i = 0; i < n; i++) {
      lu[i] = td[i] - lambda;
      luUp1[i] = i < n - 1 ? te[i] : 0;
      luUp2[i] = 0;
      luLow[i] = i < n - 1 ? te[i] : 0;
      swapped[i] = 0;
    }
    for (let i = 0; i < n - 1; i++) {
      if (Math.abs(lu[i]) >= Math.abs(luLow[i])) {
        if (lu[i] === 0) lu[i] = tiny;
        const fact = luLow[i] / lu[i];
        luLow[i] = fact;
        lu[i + 1] -= fact * luUp1[i];
      } else {
        const fact = lu[i] / luLow[i];
        lu[i] = luLow[i];
        luLow[i] = fact;
        const temp = luUp1[i];
        luUp1[i] = lu[i + 1];
        lu[i + 1] = temp - fact * lu[i + 1];
        if (i < n - 2) {
          luUp2[i] = luUp1[i + 1];
          luUp1[i + 1] = -fact * luUp1[i + 1];
        }
        swapped[i] = 1;
      }
    }
    for (let i = 0; i < n; i++) if (Math.abs(lu[i]) < tiny) lu[i] = lu[i] < 0 ? -tiny : tiny;
    // A fixed, generic start vector (no structure an eigenvector of a tridiagonal would share).
    for (let i = 0; i < n; i++) z[row + i] = 1 + 0.5 * Math.sin(1.7 * i + 0.3 * j + 0.1);
    for (let iter = 0; iter < 3; iter++) {
      // Forward: L.
      for (let i = 0; i < n - 1; i++) {
        if (swapped[i]) {
          const t = z[row + i];
          z[row + i] = z[row + i + 1];
          z[row + i + 1] = t - luLow[i] * z[row + i];
        } else z[row + i + 1] -= luLow[i] * z[row + i];
      }
      // Back: U.
      z[row + n - 1] /= lu[n - 1];
      z[row + n - 2] = (z[row + n - 2] - luUp1[n - 2] * z[row + n - 1]) / lu[n - 2];
      for (let i = n - 3; i >= 0; i--) {
        z[row + i] = (z[row + i] - luUp1[i] * z[row + i + 1] - luUp2[i] * z[row + i + 2]) / lu[i];
      }
      this.orthonormalise(j);
    }
  }

  /** Gram–Schmidt of row j of this.z against rows 0 … j−1 (twice), then unit norm. */
  private orthonormalise(j: number): void {
    const n = this.n;
    const z = this.z;
    const row = j * n;
    for (let pass = 0; pass < 2; pass++) {
      for (let p = 0; p < j; p++) {
        let dot = 0;
        for (let i = 0; i < n; i++) dot += z[p * n + i] * z[row + i];
        for (let i = 0; i < n; i++) z[row + i] -= dot * z[p * n + i];
      }
    }
    let s = 0;
    for (let i = 0; i < n; i++) s += z[row + i] * z[row + i];
    if (!(s > 0) || !Number.isFinite(s)) {
      // Lost (cannot happen for j < n in exact arithmetic): take a unit vector orthogonal to the others.
      for (let e = 0; e < n; e++) {
        z.fill(0, row, row + n);
        z[row + e] = 1;
        for (let p = 0; p < j; p++) {
          const dot = z[p * n + e];
          for (let i = 0; i < n; i++) z[row + i] -= dot * z[p * n + i];
        }
        s = 0;
        for (let i = 0; i < n; i++) s += z[row + i] * z[row + i];
        if (s > 0.5) break;
      }
    }
    const inv = 1 / Math.sqrt(s);
    for (let i = 0; i < n; i++) z[row + i] *= inv;
  }

  /** y = Q·D·z for rows 0 … k−1 of this.z, into rows of esRe/esIm. */
  private backTransform(k: number, esRe: Float64Array, esIm: Float64Array): void {
    const n = this.n;
    const { z, phRe, phIm, tau, hvr, hvi } = this;
    for (let j = 0; j < k; j++) {
      const dst = j * n;
      for (let i = 0; i < n; i++) {
        const zi = z[dst + i];
        esRe[dst + i] = phRe[i] * zi;
        esIm[dst + i] = phIm[i] * zi;
      }
      for (let r = n - 3; r >= 0; r--) {
        const t = tau[r];
        if (t === 0) continue;
        const vrow = r * n;
        let sr = 0;
        let si = 0;
        for (let i = r + 1; i < n; i++) {
          const vr = hvr[vrow + i];
          const vi = hvi[vrow + i];
          sr += vr * esRe[dst + i] + vi * esIm[dst + i];
          si += vr * esIm[dst + i] - vi * esRe[dst + i];
        }
        sr *= t;
        si *= t;
        for (let i = r + 1; i < n; i++) {
          const vr = hvr[vrow + i];
          const vi = hvi[vrow + i];
          esRe[dst + i] -= sr * vr - si * vi;
          esIm[dst + i] -= sr * vi + si * vr;
        }
      }
    }
  }
}
