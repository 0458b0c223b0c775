/**
 * Roots of a polynomial with complex coefficients.
 *
 * Input: coefficients HIGHEST power first (the numpy.roots order),
 * p(z) = c[0]·z^n + c[1]·z^(n−1) + … + c[n], as a ComplexVector (split re/im).
 * Leading zero coefficients are dropped; trailing zero coefficients give exact
 * roots at 0 (as numpy.roots does). Output: ComplexVector of the roots, in no
 * particular order. The input is not mutated.
 *
 * Method: eigenvalues of the balanced companion matrix (general-eigen.ts:
 * balancing, complex Hessenberg QR; the companion matrix is already
 * Hessenberg), the approach of numpy.roots and MATLAB roots (Edelman & Murakami,
 * Math. Comp. 64, 1995, show it is backward stable with balancing), followed by
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
}

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
  const eig = hessenbergQrEigenvalues(hr, hi, n);

  const pre = cre.subarray(first, last + 1);
  const pim = cim.subarray(first, last + 1);
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
