/**
 * Roots of a polynomial with complex coefficients.
 *
 * Input: coefficients HIGHEST power first (the numpy.roots order),
 * p(z) = c[0]·z^n + c[1]·z^(n−1) + … + c[n], as a ComplexVector (split re/im).
 * Leading zero coefficients are dropped; trailing zero coefficients give exact
 * roots at 0 (as numpy.roots does). Output: ComplexVector of the roots, in no
 * particular order. The input is not mutated.
 *
 * Method: below degree ABERTH_MIN_DEGREE, eigenvalues of the balanced companion
 * matrix (general-eigen.ts: balancing, complex Hessenberg QR; the companion matrix
 * is already Hessenberg), the approach of numpy.roots and MATLAB roots (Edelman &
 * Murakami, Math. Comp. 64, 1995, show it is backward stable with balancing); from
 * that degree on the Aberth–Ehrlich iteration (O(n²) per sweep instead of the
 * O(n³) QR: root-MUSIC at M = 64 has degree 126), falling back to the companion
 * matrix if it does not converge. Either way followed by
 * up to `polishSteps` Newton steps on the original polynomial, each kept only
 * if it lowers |p(z)|. Near-double roots (root-MUSIC's pairs z, 1/z̄ on the
 * unit circle) are ill-conditioned: a coefficient perturbation ε moves them
 * by about √ε, which is why root-MUSIC is exact only to ~1e−7° on noise-free
 * data.
 */
import { requireFiniteEntries } from '../checks';
import { ComplexVector } from './complex';
import { DoaInputError } from '../errors';
import { balanceInPlace, hessenbergQrEigenvalues } from './general-eigen';

export interface PolynomialRootsOptions {
  /** Newton polishing steps per root (default 3; 0 disables). */
  polishSteps?: number;
  /**
   * 'auto' (default): companion matrix below degree ABERTH_MIN_DEGREE, Aberth–Ehrlich from it on;
   * 'companion' or 'aberth' to force one.
   */
  method?: 'auto' | 'companion' | 'aberth';
}

/** From this degree on, 'auto' roots by Aberth–Ehrlich (O(n²) per sweep) instead of the O(n³) companion QR. */
export const ABERTH_MIN_DEGREE = 40;

export function polynomialRoots(coefficients: ComplexVector, options: PolynomialRootsOptions = {}): ComplexVector {
  const cre = coefficients.re;
  const cim = coefficients.im;
  if (cre.length !== cim.length) {
    throw new DoaInputError('bad-size', `polynomialRoots: ${cre.length} real parts but ${cim.length} imaginary parts`);
  }
  requireFiniteEntries(cre, 'polynomialRoots: real part');
  requireFiniteEntries(cim, 'polynomialRoots: imaginary part');
  const polishSteps = options.polishSteps ?? 3;
  let first = 0;
  while (first < cre.length && cre[first] === 0 && cim[first] === 0) first++;
  let last = cre.length - 1;
  while (last > first && cre[last] === 0 && cim[last] === 0) last--;
  const zeroRoots = cre.length - 1 - last;
  if (first >= cre.length) return { re: new Float64Array(0), im: new Float64Array(0) };
  const n = last - first; // degree after stripping
  const outRe = new Float64Array(n + zeroRoots);
  const outIm = new Float64Array(n + zeroRoots);
  if (n === 0) return { re: outRe, im: outIm };

  const pre = cre.subarray(first, last + 1);
  const pim = cim.subarray(first, last + 1);
  const method = options.method ?? 'auto';
  let eig: ComplexVector | null = null;
  if (method === 'aberth' || (method === 'auto' && n >= ABERTH_MIN_DEGREE)) eig = aberthEhrlich(pre, pim);
  if (!eig) eig = companionEigenvalues(cre, cim, first, n);

  for (let k = 0; k < n; k++) {
    let zr = eig.re[k];
    let zi = eig.im[k];
    if (polishSteps > 0) {
      let [vr, vi, dr, di] = evaluateWithDerivative(pre, pim, zr, zi);
      let best = Math.hypot(vr, vi);
      for (let step = 0; step < polishSteps && best > 0; step++) {
        const dd = dr * dr + di * di;
        if (dd === 0) break;
        const nzr = zr - (vr * dr + vi * di) / dd;
        const nzi = zi - (vi * dr - vr * di) / dd;
        const next = evaluateWithDerivative(pre, pim, nzr, nzi);
        const mag = Math.hypot(next[0], next[1]);
        if (!(mag < best)) break;
        zr = nzr;
        zi = nzi;
        best = mag;
        [vr, vi, dr, di] = next;
      }
    }
    outRe[k] = zr;
    outIm[k] = zi;
  }
  return { re: outRe, im: outIm };
}

/** Eigenvalues of the balanced companion matrix of c[first … first+n] (numpy.roots' method). */
function companionEigenvalues(cre: Float64Array, cim: Float64Array, first: number, n: number): ComplexVector {
  // Companion matrix: first row −c[1..n]/c[0], ones on the subdiagonal.
  const hr = new Float64Array(n * n);
  const hi = new Float64Array(n * n);
  const lr = cre[first];
  const li = cim[first];
  const den = lr * lr + li * li;
  for (let j = 0; j < n; j++) {
    const ar = cre[first + 1 + j];
    const ai = cim[first + 1 + j];
    hr[j] = -(ar * lr + ai * li) / den;
    hi[j] = -(ai * lr - ar * li) / den;
  }
  for (let i = 1; i < n; i++) hr[i * n + i - 1] = 1;
  balanceInPlace(hr, hi, n);
  return hessenbergQrEigenvalues(hr, hi, n);
}

/**
 * Aberth–Ehrlich simultaneous iteration (Aberth, Math. Comp. 27, 1973; Ehrlich, CACM 10, 1967;
 * the stopping rule and start as in Bini, Numer. Algorithms 13, 1996, simplified):
 *   z_k ← z_k − N_k / (1 − N_k·Σ_{j≠k} 1/(z_k − z_j)),  N_k = p(z_k)/p′(z_k),
 * updated in place (Gauss–Seidel order), O(n²) per sweep. Start: n points on the circle of radius
 * |c_n/c_0|^(1/n) (the geometric mean of the root moduli), rotated off the real axis. A root stops
 * when |p(z)| is below its rounding-error bound 4n·ε·Σ|c_i|·|z|^i (Horner on the moduli). Returns
 * null when some root has not converged after 500 sweeps (the caller falls back to the companion
 * matrix). Coefficients highest power first, c_0 ≠ 0, c_n ≠ 0.
 */
export function aberthEhrlich(cre: Float64Array, cim: Float64Array): ComplexVector | null {
  const n = cre.length - 1;
  const zr = new Float64Array(n);
  const zi = new Float64Array(n);
  const done = new Uint8Array(n);
  const radius = Math.pow(Math.hypot(cre[n], cim[n]) / Math.hypot(cre[0], cim[0]), 1 / n);
  const mod = new Float64Array(n + 1);
  for (let i = 0; i <= n; i++) mod[i] = Math.hypot(cre[i], cim[i]);
  const tol = 4 * n * Number.EPSILON;
  for (let k = 0; k < n; k++) {
    const a = (2 * Math.PI * k) / n + 0.4;
    zr[k] = radius * Math.cos(a);
    zi[k] = radius * Math.sin(a);
  }
  let remaining = n;
  for (let sweep = 0; sweep < 500 && remaining > 0; sweep++) {
    for (let k = 0; k < n; k++) {
      if (done[k]) continue;
      const x = zr[k];
      const y = zi[k];
      // p, p′ and the error bound by Horner
      let pr = cre[0];
      let pi = cim[0];
      let dr = 0;
      let di = 0;
      const az = Math.hypot(x, y);
      let bound = mod[0];
      for (let i = 1; i <= n; i++) {
        const ndr = dr * x - di * y + pr;
        di = dr * y + di * x + pi;
        dr = ndr;
        const npr = pr * x - pi * y + cre[i];
        pi = pr * y + pi * x + cim[i];
        pr = npr;
        bound = bound * az + mod[i];
      }
      if (Math.hypot(pr, pi) <= tol * bound) {
        done[k] = 1;
        remaining--;
        continue;
      }
      // N = p/p′
      const dd = dr * dr + di * di;
      if (dd === 0) {
        // stationary point: nudge
        zr[k] = x + radius * 1e-3;
        continue;
      }
      const nr = (pr * dr + pi * di) / dd;
      const ni = (pi * dr - pr * di) / dd;
      // S = Σ 1/(z_k − z_j)
      let sr = 0;
      let si = 0;
      for (let j = 0; j < n; j++) {
        if (j === k) continue;
        const ur = x - zr[j];
        const ui = y - zi[j];
        const uu = ur * ur + ui * ui;
        if (uu === 0) continue;
        sr += ur / uu;
        si -= ui / uu;
      }
      // w = N / (1 − N·S)
      const qr = 1 - (nr * sr - ni * si);
      const qi = -(nr * si + ni * sr);
      const qq = qr * qr + qi * qi;
      let wr: number;
      let wi: number;
      if (qq === 0 || !Number.isFinite(qq)) {
        wr = nr;
        wi = ni;
      } else {
        wr = (nr * qr + ni * qi) / qq;
        wi = (ni * qr - nr * qi) / qq;
      }
      zr[k] = x - wr;
      zi[k] = y - wi;
      if (!Number.isFinite(zr[k]) || !Number.isFinite(zi[k])) return null;
    }
  }
  if (remaining > 0) return null;
  return { re: zr, im: zi };
}

/** Horner evaluation of p(z) and p′(z); coefficients highest power first. */
export function evaluateWithDerivative(
  cre: ArrayLike<number>,
  cim: ArrayLike<number>,
  zr: number,
  zi: number,
): [number, number, number, number] {
  let pr = cre[0];
  let pi = cim[0];
  let dr = 0;
  let di = 0;
  for (let k = 1; k < cre.length; k++) {
    // d = d·z + p
    const ndr = dr * zr - di * zi + pr;
    const ndi = dr * zi + di * zr + pi;
    dr = ndr;
    di = ndi;
    // p = p·z + c_k
    const npr = pr * zr - pi * zi + cre[k];
    const npi = pr * zi + pi * zr + cim[k];
    pr = npr;
    pi = npi;
  }
  return [pr, pi, dr, di];
}
