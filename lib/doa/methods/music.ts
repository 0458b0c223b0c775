/**
 * MUSIC spectrum (Schmidt, "Multiple emitter location and signal parameter
 * estimation", IEEE Trans. AP 34(3), 1986): P(θ) = 1 / ‖Enᴴ·a(θ)‖², with En
 * the L−K eigenvectors of the smallest eigenvalues. Bearings are the K largest
 * grid peaks (docs/conventions.md §4), ascending.
 *
 * Evaluation: ‖Enᴴa‖² = aᴴ·C·a with C = En·Enᴴ, computed from the diagonal
 * sums of C by Horner's rule (spectrum.ts), L operations per angle. Where that
 * value falls below `1e−6·L·trace(C)` (near a null, where its absolute error
 * ≈ ε·Σ|c_l| would matter relative to the value) it is recomputed directly
 * as Σ_j |e_jᴴ·a|², so every value has a relative error of about 1e−10 or
 * better. P is capped at 1e300 (denominator floored at 1e−300).
 */
import { ComplexMatrix, zeros } from '../linalg/complex';
import { MethodInput, MethodOutput } from './types';
import {
  diagonalSums,
  embedOnPositions,
  gridAngles,
  gridPhasors,
  hermitianFormFromDiagonalSums,
  isUniformPositions,
  pickPeaks,
} from './spectrum';
import { DoaWarning } from '../warnings';

export const SPECTRUM_DENOMINATOR_FLOOR = 1e-300;

/** C = En·Enᴴ for the columns K … L−1 of the eigenvector matrix. */
export function noiseProjector(vectors: ComplexMatrix, sourceCount: number): ComplexMatrix {
  const l = vectors.rows;
  const out = zeros(l, l);
  for (let i = 0; i < l; i++) {
    for (let k = i; k < l; k++) {
      let sr = 0;
      let si = 0;
      for (let j = sourceCount; j < vectors.cols; j++) {
        const ar = vectors.re[i * l + j];
        const ai = vectors.im[i * l + j];
        const br = vectors.re[k * l + j];
        const bi = vectors.im[k * l + j];
        sr += ar * br + ai * bi;
        si += ai * br - ar * bi;
      }
      out.re[i * l + k] = sr;
      out.im[i * l + k] = si;
      out.re[k * l + i] = sr;
      out.im[k * l + i] = -si;
    }
  }
  return out;
}

/** ‖Enᴴ·a(θ_i)‖² at each grid angle (the MUSIC denominator). */
export function musicDenominator(
  vectors: ComplexMatrix,
  sourceCount: number,
  spacingWavelengths: number,
  anglesDeg: Float64Array,
  positions?: Int32Array,
): Float64Array {
  return musicDenominatorFromPhasors(vectors, sourceCount, gridPhasors(anglesDeg, spacingWavelengths), positions);
}

/**
 * The same denominator on precomputed phasors cos μ_i, sin μ_i (gridPhasors), so a
 * caller that evaluates many covariances at one spacing (the bins of a wideband
 * record) computes the trigonometry once. `positions` (units of d, from 0) places
 * the rows of the eigenvectors on a line with gaps (spectrum.ts embedOnPositions).
 */
export function musicDenominatorFromPhasors(
  vectors: ComplexMatrix,
  sourceCount: number,
  phasors: { cos: Float64Array; sin: Float64Array },
  positions?: Int32Array,
): Float64Array {
  const l = vectors.rows;
  const uniform = isUniformPositions(positions);
  const projector = noiseProjector(vectors, sourceCount);
  const c = diagonalSums(uniform ? projector : embedOnPositions(projector, positions!));
  const den = hermitianFormFromDiagonalSums(c, phasors);
  const threshold = 1e-6 * l * c.re[0];
  const ar = new Float64Array(l);
  const ai = new Float64Array(l);
  for (let i = 0; i < den.length; i++) {
    if (den[i] >= threshold) continue;
    // Direct: a_m = z^m by repeated multiplication is accurate enough here (|z| = 1, L ≤ a few hundred);
    // use cos/sin of m·μ for exactness instead.
    const mu = Math.atan2(phasors.sin[i], phasors.cos[i]);
    for (let m = 0; m < l; m++) {
      const p = uniform ? m : positions![m];
      ar[m] = Math.cos(mu * p);
      ai[m] = Math.sin(mu * p);
    }
    let total = 0;
    for (let j = sourceCount; j < l; j++) {
      let sr = 0;
      let si = 0;
      for (let m = 0; m < l; m++) {
        const er = vectors.re[m * l + j];
        const ei = vectors.im[m * l + j];
        // conj(e)·a
        sr += er * ar[m] + ei * ai[m];
        si += er * ai[m] - ei * ar[m];
      }
      total += sr * sr + si * si;
    }
    den[i] = total;
  }
  return den;
}

export function musicSpectrumValues(
  vectors: ComplexMatrix,
  sourceCount: number,
  spacingWavelengths: number,
  anglesDeg: Float64Array,
  positions?: Int32Array,
): Float64Array {
  const den = musicDenominator(vectors, sourceCount, spacingWavelengths, anglesDeg, positions);
  const p = new Float64Array(den.length);
  for (let i = 0; i < den.length; i++) p[i] = 1 / Math.max(den[i], SPECTRUM_DENOMINATOR_FLOOR);
  return p;
}

export function peakBearings(
  values: Float64Array,
  anglesDeg: Float64Array,
  sourceCount: number,
  method: string,
): { bearingsDeg: number[]; warnings: DoaWarning[] } {
  const idx = pickPeaks(values, sourceCount);
  const warnings: DoaWarning[] = [];
  if (idx.length < sourceCount) {
    warnings.push({
      code: 'fewer-peaks-than-sources',
      message: `${method}: the spectrum has ${idx.length} peak(s) on the grid but ${sourceCount} source(s) were asked for`,
    });
  }
  return { bearingsDeg: idx.map((i) => anglesDeg[i]), warnings };
}

export function runMusic(input: MethodInput): MethodOutput {
  const angles = gridAngles(input.grid);
  const values = musicSpectrumValues(
    input.eigenvectors,
    input.sourceCount,
    input.spacingWavelengths,
    angles,
    input.positions,
  );
  const { bearingsDeg, warnings } = peakBearings(values, angles, input.sourceCount, 'music');
  return { bearingsDeg, warnings, spectrum: { kind: 'music', values } };
}
