/**
 * The contract every estimation method implements (see README "Adding a method").
 *
 * A method receives the FINAL covariance (after the arrangement, smoothing and
 * forward–backward steps of docs/conventions.md §2), its Hermitian eigendecomposition
 * (values descending, vectors in columns), the source count K (0 ≤ K < L),
 * the spacing d in wavelengths and the spectral grid. It returns bearings in
 * degrees sorted ascending (docs/conventions.md §4) and any warnings.
 */
import { ComplexMatrix } from '../linalg/complex';
import { AngleGrid } from './spectrum';
import { DoaWarning } from '../warnings';

export interface MethodInput {
  readonly covariance: ComplexMatrix;
  readonly eigenvalues: Float64Array;
  readonly eigenvectors: ComplexMatrix;
  readonly sourceCount: number;
  readonly spacingWavelengths: number;
  readonly grid: AngleGrid;
  /**
   * Element positions in units of d, ascending integers starting at 0, one per covariance row
   * (a line with disabled elements, docs/conventions.md §9). Absent: 0 … L−1 (a uniform line).
   * Only the spectral methods (MUSIC, Bartlett, MVDR) accept positions with gaps.
   */
  readonly positions?: Int32Array;
}

export type SpectrumKind = 'music' | 'bartlett' | 'mvdr';

export interface SpectrumResult {
  /** Which spectrum this is (ESPRIT and root-MUSIC report the MUSIC spectrum of the same subspace). */
  readonly kind: SpectrumKind;
  readonly startDeg: number;
  readonly stepDeg: number;
  /** 10·log10 P(θ_i), not normalised. */
  readonly valuesDb: Float64Array;
}

export interface MethodOutput {
  readonly bearingsDeg: number[];
  readonly warnings: DoaWarning[];
  /** Linear spectrum on the grid, for spectral methods only. */
  readonly spectrum?: { kind: SpectrumKind; values: Float64Array };
}

export type MethodRunner = (input: MethodInput) => MethodOutput;
