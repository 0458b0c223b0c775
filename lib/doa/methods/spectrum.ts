/**
 * Spectral grid, fast evaluation of Hermitian forms aᴴ(θ)·C·a(θ) on it, and
 * peak picking (docs/conventions.md §4).
 *
 * Grid: θ_i = startDeg + i·stepDeg, i = 0 … count−1, in degrees. The default
 * is θ_i = (i − 9000)/100, i = 0 … 18000 (0.01° over −90 … 90 inclusive).
 * When 1/stepDeg is an integer q and startDeg·q is an integer i₀, angles are
 * computed as (i₀ + i)/q, so the default grid is bit-identical to (i−9000)/100.
 *
 * Hermitian form on the grid: for a ULA, a_m = z^m with z = e^{jμ},
 * μ = 2π·d·sin θ, so
 *   aᴴ·C·a = Σ_{m,n} C[m,n]·z^{n−m} = c_0 + 2·Re Σ_{l=1}^{L−1} c_l·z^l,
 * where c_l = Σ_m C[m, m+l] is the sum of the l-th (upper) diagonal; the
 * same c_l that root-MUSIC uses. Horner's rule on |z| = 1 evaluates this in
 * L complex multiply–adds per angle (backward stable), instead of the L²
 * of a direct product: 18001 angles at L = 64 take about a millisecond. The
 * absolute rounding error is about ε·Σ|c_l|, so values near a MUSIC null
 * (where the form is tiny) are recomputed directly; see music.ts.
 */
import { requireSquare } from '../checks';
import { ComplexMatrix, ComplexVector } from '../linalg/complex';
import { DoaInputError } from '../errors';
import { RAD_PER_DEG } from '../angles';

export interface AngleGrid {
  readonly startDeg: number;
  readonly stepDeg: number;
  readonly count: number;
}

export const DEFAULT_GRID: AngleGrid = Object.freeze({ startDeg: -90, stepDeg: 0.01, count: 18001 });

export function validateGrid(grid: AngleGrid): void {
  const { startDeg, stepDeg, count } = grid;
  if (!Number.isFinite(startDeg) || !Number.isFinite(stepDeg) || !(stepDeg > 0)) {
    throw new DoaInputError(
      'bad-option',
      `grid: startDeg ${startDeg} and stepDeg ${stepDeg} must be finite with stepDeg > 0`,
    );
  }
  if (!Number.isInteger(count) || count < 3)
    throw new DoaInputError('bad-option', `grid: count ${count} must be an integer ≥ 3`);
  const last = startDeg + (count - 1) * stepDeg;
  if (startDeg < -90 - 1e-9 || last > 90 + 1e-9) {
    throw new DoaInputError('bad-option', `grid: ${startDeg}° … ${last}° leaves the bearing range −90° … 90°`);
  }
}

export function gridAngles(grid: AngleGrid): Float64Array {
  validateGrid(grid);
  const out = new Float64Array(grid.count);
  const q = 1 / grid.stepDeg;
  const qi = Math.round(q);
  const i0 = grid.startDeg * qi;
  if (Math.abs(q - qi) < 1e-9 * q && Math.abs(i0 - Math.round(i0)) < 1e-9) {
    const start = Math.round(i0);
    for (let i = 0; i < grid.count; i++) out[i] = Math.max(-90, Math.min(90, (start + i) / qi));
  } else {
    for (let i = 0; i < grid.count; i++) out[i] = Math.max(-90, Math.min(90, grid.startDeg + i * grid.stepDeg));
  }
  return out;
}

/** c_l = Σ_m C[m, m+l], l = 0 … L−1, for a square C. */
export function diagonalSums(c: ComplexMatrix): ComplexVector {
  requireSquare(c, 'diagonalSums');
  const l = c.rows;
  const re = new Float64Array(l);
  const im = new Float64Array(l);
  for (let d = 0; d < l; d++) {
    let sr = 0;
    let si = 0;
    for (let m = 0; m + d < l; m++) {
      sr += c.re[m * l + m + d];
      si += c.im[m * l + m + d];
    }
    re[d] = sr;
    im[d] = si;
  }
  return { re, im };
}

/**
 * A Hermitian form on element positions with gaps, as one on the full line: C (L × L, rows at
 * integer positions p_0 = 0 < p_1 < … < p_{L−1}, in units of d) placed into a P × P matrix with
 * P = p_{L−1} + 1 and zeros at the missing positions. Since a_{p}(θ) = z^p, aᴴ·C·a on the
 * positions equals aᴴ·C_P·a on the full line, so the diagonal-sum evaluation applies unchanged.
 */
export function embedOnPositions(c: ComplexMatrix, positions: Int32Array): ComplexMatrix {
  requireSquare(c, 'embedOnPositions');
  const l = c.rows;
  if (positions.length !== l)
    throw new DoaInputError('bad-size', `positions has ${positions.length} entries for a ${l} × ${l} matrix`);
  for (let i = 0; i < l; i++) {
    if (!Number.isInteger(positions[i]) || positions[i] < 0 || (i > 0 && positions[i] <= positions[i - 1]))
      throw new DoaInputError(
        'bad-option',
        `positions must be ascending integers ≥ 0; positions[${i}] = ${positions[i]}`,
      );
  }
  const p = l === 0 ? 0 : positions[l - 1] + 1;
  const re = new Float64Array(p * p);
  const im = new Float64Array(p * p);
  for (let i = 0; i < l; i++) {
    const row = positions[i] * p;
    for (let k = 0; k < l; k++) {
      re[row + positions[k]] = c.re[i * l + k];
      im[row + positions[k]] = c.im[i * l + k];
    }
  }
  return { rows: p, cols: p, re, im };
}

/** True when positions are absent or exactly 0 … L−1. */
export function isUniformPositions(positions: Int32Array | undefined): boolean {
  if (!positions) return true;
  for (let i = 0; i < positions.length; i++) if (positions[i] !== i) return false;
  return true;
}

/** cos μ_i and sin μ_i for the grid angles, μ = 2π·d·sin θ. */
export function gridPhasors(
  anglesDeg: Float64Array,
  spacingWavelengths: number,
): { cos: Float64Array; sin: Float64Array } {
  const n = anglesDeg.length;
  const cos = new Float64Array(n);
  const sin = new Float64Array(n);
  const k = 2 * Math.PI * spacingWavelengths;
  for (let i = 0; i < n; i++) {
    const mu = k * Math.sin(anglesDeg[i] * RAD_PER_DEG);
    cos[i] = Math.cos(mu);
    sin[i] = Math.sin(mu);
  }
  return { cos, sin };
}

/**
 * aᴴ·C·a at each grid phasor, from the diagonal sums c_l of a Hermitian C
 * (only c_0 … c_{L−1} are needed: c_{−l} = conj(c_l)).
 */
export function hermitianFormFromDiagonalSums(
  c: ComplexVector,
  phasors: { cos: Float64Array; sin: Float64Array },
): Float64Array {
  const n = phasors.cos.length;
  const l = c.re.length;
  const out = new Float64Array(n);
  const cr = c.re;
  const ci = c.im;
  const c0 = cr[0];
  if (l === 1) {
    out.fill(c0);
    return out;
  }
  const top = l - 1;
  for (let i = 0; i < n; i++) {
    const zr = phasors.cos[i];
    const zi = phasors.sin[i];
    let qr = cr[top];
    let qi = ci[top];
    for (let k = top - 1; k >= 1; k--) {
      const tr = qr * zr - qi * zi + cr[k];
      qi = qr * zi + qi * zr + ci[k];
      qr = tr;
    }
    // q·z, real part only
    out[i] = c0 + 2 * (qr * zr - qi * zi);
  }
  return out;
}

/**
 * Peaks per docs/conventions.md §4: interior i with P[i] > P[i−1] and P[i] ≥ P[i+1];
 * the `count` largest (ties to the lower index), returned in ascending index
 * order (= ascending bearing on an increasing grid).
 */
export function pickPeaks(values: ArrayLike<number>, count: number): number[] {
  const peaks: number[] = [];
  for (let i = 1; i < values.length - 1; i++) {
    if (values[i] > values[i - 1] && values[i] >= values[i + 1]) peaks.push(i);
  }
  peaks.sort((a, b) => values[b] - values[a] || a - b);
  return peaks.slice(0, Math.max(0, count)).sort((a, b) => a - b);
}

/** 10·log10 of each value (values ≤ 0 give −Infinity; callers keep values positive). */
export function toDecibels(values: Float64Array): Float64Array {
  const out = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) out[i] = 10 * Math.log10(values[i]);
  return out;
}
