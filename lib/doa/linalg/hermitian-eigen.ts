/**
 * Eigendecomposition of a complex Hermitian matrix, A = V·diag(λ)·Vᴴ.
 *
 * Layout: ComplexMatrix (split re/im, row-major, index origin 0). The result
 * has `values` sorted in DESCENDING order (docs/conventions.md §2) and `vectors` with
 * eigenvector j in COLUMN j, each of unit 2-norm. The input is not mutated;
 * the routine works on (A + Aᴴ)/2, so a matrix that is Hermitian only to
 * rounding is accepted.
 *
 * Method (why not ml-matrix: it is real-only, and the 2n × 2n real embedding
 * [[Re, −Im], [Im, Re]] costs 8× the arithmetic and doubles every eigenvalue):
 *  1. Householder reduction to Hermitian tridiagonal form, A = Q·T·Qᴴ, with
 *     complex reflectors H = I − τ·v·vᴴ applied as a rank-2 update
 *     (Golub & Van Loan, Matrix Computations, 4th ed., §8.3.1).
 *  2. A unitary diagonal scaling D makes T real: T = D·Tr·Dᴴ with Tr real
 *     symmetric tridiagonal (the off-diagonal moduli).
 *  3. Implicit QL with shifts on Tr (tridiagonal-ql.ts), rotations
 *     accumulated on contiguous rows.
 *  4. Back-transformation V = Q·D·Z.
 * For real symmetric input every reflector and phase stays real, so the
 * vectors come out exactly real (symmetric-eigen.ts relies on this).
 */
import { requireFiniteEntries, requireSquare } from '../checks';
import { ComplexMatrix, zeros } from './complex';
import { tridiagonalQlInPlace } from './tridiagonal-ql';

export interface HermitianEigenResult {
  /** Eigenvalues, descending. */
  readonly values: Float64Array;
  /** n × n, eigenvector j in column j; null when vectors were not requested. */
  readonly vectors: ComplexMatrix | null;
}

export interface HermitianEigenOptions {
  /** Compute eigenvectors (default true). Eigenvalues alone cost about a quarter. */
  vectors?: boolean;
}

export function hermitianEigen(a: ComplexMatrix, options: { vectors: false }): HermitianEigenResult;
export function hermitianEigen(
  a: ComplexMatrix,
  options?: { vectors?: true },
): HermitianEigenResult & { vectors: ComplexMatrix };
export function hermitianEigen(a: ComplexMatrix, options: HermitianEigenOptions = {}): HermitianEigenResult {
  requireSquare(a, 'hermitianEigen');
  requireFiniteEntries(a.re, 'hermitianEigen: real part');
  requireFiniteEntries(a.im, 'hermitianEigen: imaginary part');
  const wantVectors = options.vectors !== false;
  const n = a.rows;
  if (n === 0) return { values: new Float64Array(0), vectors: wantVectors ? zeros(0, 0) : null };

  // Working copy, exactly Hermitian.
  const ar = new Float64Array(n * n);
  const ai = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    ar[i * n + i] = a.re[i * n + i];
    for (let k = i + 1; k < n; k++) {
      const re = 0.5 * (a.re[i * n + k] + a.re[k * n + i]);
      const im = 0.5 * (a.im[i * n + k] - a.im[k * n + i]);
      ar[i * n + k] = re;
      ai[i * n + k] = im;
      ar[k * n + i] = re;
      ai[k * n + i] = -im;
    }
  }

  // Householder vectors: row k of (hvr, hvi) holds v for reflector k in entries k+1…n−1.
  const hvr = new Float64Array(n * n);
  const hvi = new Float64Array(n * n);
  const tau = new Float64Array(n);
  const subRe = new Float64Array(n); // T[k+1, k]
  const subIm = new Float64Array(n);
  const pr = new Float64Array(n);
  const pi = new Float64Array(n);

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
    const x0abs = Math.hypot(x0r, x0i);
    const xnorm = Math.sqrt(tail2 + x0abs * x0abs);
    const phr = x0abs === 0 ? 1 : x0r / x0abs;
    const phi = x0abs === 0 ? 0 : x0i / x0abs;
    // alpha = −phase(x0)·‖x‖; v = x − alpha·e1.
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
    // p = τ·A22·v
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
      vhp += hvr[vrow + i] * pr[i] + hvi[vrow + i] * pi[i]; // Re(conj(v)·p); the imaginary part is zero
    }
    // w = p − (τ/2)(vᴴp)·v, then A22 −= v·wᴴ + w·vᴴ
    const kk = 0.5 * t * vhp;
    for (let i = k + 1; i < n; i++) {
      pr[i] -= kk * hvr[vrow + i];
      pi[i] -= kk * hvi[vrow + i];
    }
    for (let i = k + 1; i < n; i++) {
      const vr = hvr[vrow + i];
      const vi = hvi[vrow + i];
      const wr = pr[i];
      const wi = pi[i];
      const row = i * n;
      for (let j = k + 1; j < n; j++) {
        const vjr = hvr[vrow + j];
        const vji = hvi[vrow + j];
        const wjr = pr[j];
        const wji = pi[j];
        // v_i·conj(w_j) + w_i·conj(v_j)
        ar[row + j] -= vr * wjr + vi * wji + wr * vjr + wi * vji;
        ai[row + j] -= vi * wjr - vr * wji + wi * vjr - wr * vji;
      }
    }
  }
  if (n >= 2) {
    subRe[n - 2] = ar[(n - 1) * n + (n - 2)];
    subIm[n - 2] = ai[(n - 1) * n + (n - 2)];
  }

  // Real tridiagonal Tr = Dᴴ·T·D with φ_0 = 1, φ_{k+1} = φ_k·T[k+1,k]/|T[k+1,k]|.
  const diag = new Float64Array(n);
  const off = new Float64Array(n);
  const phRe = new Float64Array(n);
  const phIm = new Float64Array(n);
  phRe[0] = 1;
  for (let i = 0; i < n; i++) diag[i] = ar[i * n + i];
  for (let k = 0; k < n - 1; k++) {
    const m = Math.hypot(subRe[k], subIm[k]);
    off[k] = m;
    const ur = m === 0 ? 1 : subRe[k] / m;
    const ui = m === 0 ? 0 : subIm[k] / m;
    phRe[k + 1] = phRe[k] * ur - phIm[k] * ui;
    phIm[k + 1] = phRe[k] * ui + phIm[k] * ur;
  }

  let zt: Float64Array | null = null;
  if (wantVectors) {
    zt = new Float64Array(n * n);
    for (let i = 0; i < n; i++) zt[i * n + i] = 1;
  }
  tridiagonalQlInPlace(diag, off, zt);

  const order = Array.from({ length: n }, (_, i) => i).sort((x, y) => diag[y] - diag[x] || x - y);
  const values = new Float64Array(n);
  for (let j = 0; j < n; j++) values[j] = diag[order[j]];
  if (!wantVectors || zt === null) return { values, vectors: null };

  // Row j of (yr, yi) becomes eigenvector j: y = Q·D·z.
  const yr = new Float64Array(n * n);
  const yi = new Float64Array(n * n);
  for (let j = 0; j < n; j++) {
    const src = order[j] * n;
    const dst = j * n;
    for (let i = 0; i < n; i++) {
      const z = zt[src + i];
      yr[dst + i] = phRe[i] * z;
      yi[dst + i] = phIm[i] * z;
    }
    for (let k = n - 3; k >= 0; k--) {
      const t = tau[k];
      if (t === 0) continue;
      const vrow = k * n;
      // s = vᴴ·y
      let sr = 0;
      let si = 0;
      for (let i = k + 1; i < n; i++) {
        const vr = hvr[vrow + i];
        const vi = hvi[vrow + i];
        sr += vr * yr[dst + i] + vi * yi[dst + i];
        si += vr * yi[dst + i] - vi * yr[dst + i];
      }
      sr *= t;
      si *= t;
      for (let i = k + 1; i < n; i++) {
        const vr = hvr[vrow + i];
        const vi = hvi[vrow + i];
        yr[dst + i] -= sr * vr - si * vi;
        yi[dst + i] -= sr * vi + si * vr;
      }
    }
  }
  const vectors = zeros(n, n);
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      vectors.re[i * n + j] = yr[j * n + i];
      vectors.im[i * n + j] = yi[j * n + i];
    }
  }
  return { values, vectors };
}
