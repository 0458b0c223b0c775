/**
 * Root-MUSIC (Barabell, "Improving the resolution performance of
 * eigenstructure-based direction-finding algorithms", ICASSP 1983), as
 * docs/conventions.md §4 fixes it:
 *  - C = En·Enᴴ; c_l = the sum of the l-th diagonal, c_l = Σ_m C[m, m+l],
 *    l = −(L−1) … L−1 (so aᴴCa = Σ_l c_l·z^l on z = e^{jμ});
 *  - the polynomial Σ_l c_l·z^(l+L−1), of degree 2L−2;
 *  - drop roots with |arg z| > 2π·d; of those with |z| ≤ 1 keep the K closest
 *    to the unit circle; μ_k = arg z_k.
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

export function rootMusicElectricalAngles(
  vectors: ComplexMatrix,
  sourceCount: number,
  spacingWavelengths: number,
): Float64Array {
  const roots = polynomialRoots(rootMusicCoefficients(vectors, sourceCount));
  const limit = 2 * Math.PI * spacingWavelengths;
  const kept: { mu: number; distance: number }[] = [];
  for (let i = 0; i < roots.re.length; i++) {
    const mu = Math.atan2(roots.im[i], roots.re[i]);
    if (Math.abs(mu) > limit) continue;
    const mag = Math.hypot(roots.re[i], roots.im[i]);
    if (mag > 1) continue;
    kept.push({ mu, distance: 1 - mag });
  }
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
      message: `root-music: only ${mus.length} admissible root(s) inside the unit circle for ${input.sourceCount} source(s)`,
    });
  }
  return { bearingsDeg, warnings };
}
