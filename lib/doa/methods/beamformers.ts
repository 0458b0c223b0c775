/**
 * Beamforming spectra (docs/conventions.md §4), both evaluated as Hermitian forms on
 * the grid from diagonal sums (spectrum.ts):
 *  - bartlett: P(θ) = aᴴ·R·a / L² (aᴴRa/(aᴴa) scaled by 1/L).
 *  - mvdr:     P(θ) = 1 / (aᴴ·R⁻¹·a) (Capon, "High-resolution frequency–
 *              wavenumber spectrum analysis", Proc. IEEE 57(8), 1969).
 *              R⁻¹ = V·diag(1/λ)·Vᴴ from the eigendecomposition; when
 *              cond(R) = λmax/λmin > 1e13 (or λmin ≤ 0) the pseudo-inverse is
 *              used instead (eigenvalues with |λ| ≤ 1e−15·max|λ| dropped, as
 *              numpy.linalg.pinv(hermitian=True)) and a warning is raised.
 * The MVDR denominator is floored at 1e−300.
 */
import { ComplexMatrix, zeros } from '../linalg/complex';
import { MethodInput, MethodOutput } from './types';
import { SPECTRUM_DENOMINATOR_FLOOR, peakBearings } from './music';
import {
  diagonalSums,
  embedOnPositions,
  gridAngles,
  gridPhasors,
  hermitianFormFromDiagonalSums,
  isUniformPositions,
} from './spectrum';
import { DoaWarning } from '../warnings';

export const MVDR_CONDITION_LIMIT = 1e13;

/** `positions` (units of d, from 0) places the rows of R on a line with gaps; L is then the element count, not the span. */
export function bartlettSpectrumValues(
  r: ComplexMatrix,
  spacingWavelengths: number,
  anglesDeg: Float64Array,
  positions?: Int32Array,
): Float64Array {
  const placed = isUniformPositions(positions) ? r : embedOnPositions(r, positions!);
  const values = hermitianFormFromDiagonalSums(diagonalSums(placed), gridPhasors(anglesDeg, spacingWavelengths));
  const inv = 1 / (r.rows * r.rows);
  for (let i = 0; i < values.length; i++) values[i] *= inv;
  return values;
}

/** λmax/λmin for descending eigenvalues (Infinity when λmin ≤ 0). */
export function conditionNumber(eigenvalues: Float64Array): number {
  const lo = eigenvalues[eigenvalues.length - 1];
  return lo > 0 ? eigenvalues[0] / lo : Infinity;
}

/** R⁻¹ (or its pseudo-inverse) from the eigendecomposition. */
export function inverseFromEigen(values: Float64Array, vectors: ComplexMatrix, pseudo: boolean): ComplexMatrix {
  const l = vectors.rows;
  let maxAbs = 0;
  for (let j = 0; j < values.length; j++) maxAbs = Math.max(maxAbs, Math.abs(values[j]));
  const cutoff = pseudo ? 1e-15 * maxAbs : 0;
  const w = new Float64Array(values.length);
  for (let j = 0; j < values.length; j++) w[j] = Math.abs(values[j]) > cutoff && values[j] !== 0 ? 1 / values[j] : 0;
  const out = zeros(l, l);
  for (let i = 0; i < l; i++) {
    for (let k = i; k < l; k++) {
      let sr = 0;
      let si = 0;
      for (let j = 0; j < values.length; j++) {
        if (w[j] === 0) continue;
        const ar = vectors.re[i * l + j];
        const ai = vectors.im[i * l + j];
        const br = vectors.re[k * l + j];
        const bi = vectors.im[k * l + j];
        sr += w[j] * (ar * br + ai * bi);
        si += w[j] * (ai * br - ar * bi);
      }
      out.re[i * l + k] = sr;
      out.im[i * l + k] = si;
      out.re[k * l + i] = sr;
      out.im[k * l + i] = -si;
    }
  }
  return out;
}

export function mvdrSpectrumValues(
  values: Float64Array,
  vectors: ComplexMatrix,
  spacingWavelengths: number,
  anglesDeg: Float64Array,
  positions?: Int32Array,
): { values: Float64Array; pseudoInverse: boolean; condition: number } {
  const condition = conditionNumber(values);
  const pseudo = !(condition <= MVDR_CONDITION_LIMIT);
  const inv = inverseFromEigen(values, vectors, pseudo);
  const rinv = isUniformPositions(positions) ? inv : embedOnPositions(inv, positions!);
  const den = hermitianFormFromDiagonalSums(diagonalSums(rinv), gridPhasors(anglesDeg, spacingWavelengths));
  const p = new Float64Array(den.length);
  for (let i = 0; i < den.length; i++) p[i] = 1 / Math.max(den[i], SPECTRUM_DENOMINATOR_FLOOR);
  return { values: p, pseudoInverse: pseudo, condition };
}

export function runBartlett(input: MethodInput): MethodOutput {
  const angles = gridAngles(input.grid);
  const values = bartlettSpectrumValues(input.covariance, input.spacingWavelengths, angles, input.positions);
  const { bearingsDeg, warnings } = peakBearings(values, angles, input.sourceCount, 'bartlett');
  return { bearingsDeg, warnings, spectrum: { kind: 'bartlett', values } };
}

export function runMvdr(input: MethodInput): MethodOutput {
  const angles = gridAngles(input.grid);
  const r = mvdrSpectrumValues(
    input.eigenvalues,
    input.eigenvectors,
    input.spacingWavelengths,
    angles,
    input.positions,
  );
  const peaks = peakBearings(r.values, angles, input.sourceCount, 'mvdr');
  const warnings: DoaWarning[] = [...peaks.warnings];
  if (r.pseudoInverse) {
    warnings.unshift({
      code: 'ill-conditioned-covariance',
      message: `mvdr: cond(R) = ${r.condition.toExponential(3)} exceeds 1e13, so the pseudo-inverse of R was used`,
    });
  }
  return { bearingsDeg: peaks.bearingsDeg, warnings, spectrum: { kind: 'mvdr', values: r.values } };
}
