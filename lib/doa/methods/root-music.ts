/**
 * Root-MUSIC (Barabell, "Improving the resolution performance of
 * eigenstructure-based direction-finding algorithms", ICASSP 1983), as
 * docs/conventions.md §4 fixes it:
 *  - C = En·Enᴴ; c_l = the sum of the l-th diagonal, c_l = Σ_m C[m, m+l],
 *    l = −(L−1) … L−1 (so aᴴCa = Σ_l c_l·z^l on z = e^{jμ});
 *  - the polynomial Σ_l c_l·z^(l+L−1), of degree 2L−2;
 *  - pair every root z with its mate near 1/z̄ (pairReciprocalRoots), drop pairs
 *    with |μ| > 2π·d, keep the K pairs closest to the unit circle; μ_k = the pair's
 *    argument. The choice never depends on which side of the circle rounding put a
 *    root; with fewer admissible pairs than K, fewer bearings come back with the
 *    warning `fewer-roots-than-sources`.
 * Roots come from polynomial-roots.ts (companion matrix + Newton polish).
 */
import { bearingsFromElectricalAngles } from '../angles';
import { clipWarnings } from './esprit';
import { MethodInput, MethodOutput } from './types';
import { noiseProjector } from './music';
import { polynomialRoots } from '../linalg/polynomial-roots';
import { diagonalSums } from './spectrum';
import { ComplexMatrix } from '../linalg/complex';
import { DoaWarning } from '../warnings';

/** Polynomial coefficients, highest power first: c_{L−1}, …, c_0, c_{−1} = conj(c_1), …, c_{−(L−1)}. */
export function rootMusicCoefficients(
  vectors: ComplexMatrix,
  sourceCount: number,
): { re: Float64Array; im: Float64Array } {
  const c = diagonalSums(noiseProjector(vectors, sourceCount));
  const l = c.re.length;
  const re = new Float64Array(2 * l - 1);
  const im = new Float64Array(2 * l - 1);
  for (let k = 0; k < l; k++) {
    // power l+L−1 for diagonal l: index (from the top) = (2L−2) − (l + L − 1) = L−1−l
    re[l - 1 - k] = c.re[k];
    im[l - 1 - k] = c.im[k];
    re[l - 1 + k] = c.re[k];
    im[l - 1 + k] = -c.im[k];
  }
  return { re, im };
}

export interface RootPair {
  /** Electrical angle of the pair, radians: arg of the mean of its two members mapped inside the circle. */
  mu: number;
  /** Distance of the pair to the unit circle, (|ln|z_i|| + |ln|z_j||)/2; 0 for a root pair on the circle. */
  distance: number;
}

/**
 * Pairs the roots of a conjugate-palindromic polynomial as (z, 1/z̄). The root-MUSIC polynomial
 * has c_{−l} = conj(c_l), so its roots come exactly in such pairs; rounding can move both members
 * of a near-unit-circle pair to the same side of the circle, which is why no rule of the form
 * "|z| ≤ 1" is used. Pairing is greedy on the symmetric cost |z_j − 1/z̄_i|² + |z_i − 1/z̄_j|²,
 * smallest first (ties to the lower index pair), computed as repeated mutual-nearest-neighbour
 * matching (the same result, O(n²) per round, usually one or two rounds). Roots at 0 or non-finite roots have no mate and are left out.
 */
export function pairReciprocalRoots(re: ArrayLike<number>, im: ArrayLike<number>): RootPair[] {
  const n = re.length;
  // reflections 1/z̄ = z/|z|²
  const rr = new Float64Array(n);
  const ri = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const m2 = re[i] * re[i] + im[i] * im[i];
    rr[i] = m2 > 0 ? re[i] / m2 : Infinity;
    ri[i] = m2 > 0 ? im[i] / m2 : Infinity;
  }
  // Greedy matching on the strict order (cost, lower index, higher index) equals repeatedly
  // matching mutual nearest neighbours under that order; each round is O(n²) without sorting.
  const used = new Uint8Array(n);
  const best = new Int32Array(n);
  const bestCost = new Float64Array(n);
  const pairs: RootPair[] = [];
  const matched: [number, number][] = [];
  let unused = n;
  while (unused >= 2) {
    for (let i = 0; i < n; i++) {
      best[i] = -1;
      bestCost[i] = Infinity;
      if (used[i]) continue;
      const zr = re[i];
      const zi = im[i];
      const fr = rr[i];
      const fi = ri[i];
      let bj = -1;
      let bc = Infinity;
      for (let j = 0; j < n; j++) {
        if (j === i || used[j]) continue;
        const a = re[j] - fr;
        const b = im[j] - fi;
        const c = zr - rr[j];
        const d = zi - ri[j];
        const cost = a * a + b * b + c * c + d * d;
        // strict order: cost, then the lower index of the pair, then the higher (j ascending
        // here, so among equal costs the first j seen already has the lower pair indices)
        if (cost < bc) {
          bc = cost;
          bj = j;
        }
      }
      if (Number.isFinite(bc)) {
        best[i] = bj;
        bestCost[i] = bc;
      }
    }
    let formed = 0;
    for (let i = 0; i < n; i++) {
      const j = best[i];
      if (j > i && best[j] === i) {
        used[i] = 1;
        used[j] = 1;
        matched.push([i, j]);
        formed++;
        unused -= 2;
      }
    }
    if (formed === 0) break;
  }
  matched.sort((a, b) => a[0] - b[0]);
  for (const [i, j] of matched) {
    // both members mapped inside the circle (z or 1/z̄, same argument), then averaged
    const inside = (k: number): [number, number] => {
      const m2 = re[k] * re[k] + im[k] * im[k];
      return m2 > 1 ? [rr[k], ri[k]] : [re[k], im[k]];
    };
    const [ar, ai] = inside(i);
    const [br, bi] = inside(j);
    const mu = Math.atan2(ai + bi, ar + br);
    const distance =
      0.5 * (Math.abs(Math.log(Math.hypot(re[i], im[i]))) + Math.abs(Math.log(Math.hypot(re[j], im[j]))));
    pairs.push({ mu, distance });
  }
  return pairs;
}

/**
 * Electrical angles of the K root pairs nearest the unit circle among those with |μ| ≤ 2π·d,
 * nearest first. Fewer than K come back when fewer admissible pairs exist (the caller warns).
 */
export function rootMusicElectricalAngles(
  vectors: ComplexMatrix,
  sourceCount: number,
  spacingWavelengths: number,
): Float64Array {
  const roots = polynomialRoots(rootMusicCoefficients(vectors, sourceCount));
  const limit = 2 * Math.PI * spacingWavelengths;
  const kept = pairReciprocalRoots(roots.re, roots.im).filter((p) => Math.abs(p.mu) <= limit);
  kept.sort((a, b) => a.distance - b.distance);
  return Float64Array.from(kept.slice(0, sourceCount).map((r) => r.mu));
}

export function runRootMusic(input: MethodInput): MethodOutput {
  if (input.sourceCount === 0) return { bearingsDeg: [], warnings: [] };
  const mus = rootMusicElectricalAngles(input.eigenvectors, input.sourceCount, input.spacingWavelengths);
  const { bearingsDeg, clippedCount } = bearingsFromElectricalAngles(mus, input.spacingWavelengths);
  const warnings: DoaWarning[] = clipWarnings(clippedCount, 'root-music');
  if (mus.length < input.sourceCount) {
    warnings.push({
      code: 'fewer-roots-than-sources',
      message: `root-music: only ${mus.length} admissible root pair(s) (|μ| ≤ 2π·d) for ${input.sourceCount} source(s)`,
    });
  }
  return { bearingsDeg, warnings };
}
