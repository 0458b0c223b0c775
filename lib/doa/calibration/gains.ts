/**
 * Complex element gains (docs/conventions.md §9).
 *
 * Element m's complex gain is g_m = 10^(gainDb_m / 20) · exp(+j · phaseDeg_m · π / 180);
 * the recorded snapshot is x_m = g_m · (Σ_k a_m(θ_k) s_k) + n_m. A calibration holds
 * g_m relative to element 1 (g_1 = 1). Applying it divides row m of the snapshot
 * matrix (rows = elements, columns = snapshots, split re/im layout) by g_m before the
 * covariance is formed.
 */
import type { ComplexMatrix } from '../linalg/complex';
import { DoaInputError } from '../errors';

export interface ElementGainState {
  gainDb: number;
  phaseDeg: number;
}

/** Split-layout complex gains, one per element. */
export interface ElementGains {
  re: Float64Array;
  im: Float64Array;
}

export function complexGains(states: readonly ElementGainState[]): ElementGains {
  const m = states.length;
  const re = new Float64Array(m);
  const im = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    const amp = 10 ** (states[i].gainDb / 20);
    const ph = (states[i].phaseDeg * Math.PI) / 180;
    re[i] = amp * Math.cos(ph);
    im[i] = amp * Math.sin(ph);
  }
  return { re, im };
}

/** Inverse of complexGains: gain in dB and phase in degrees wrapped to (−180°, 180°]. */
export function gainStates(gains: ElementGains): ElementGainState[] {
  const out: ElementGainState[] = [];
  for (let i = 0; i < gains.re.length; i++) {
    const amp = Math.hypot(gains.re[i], gains.im[i]);
    let ph = (Math.atan2(gains.im[i], gains.re[i]) * 180) / Math.PI;
    if (ph <= -180) ph += 360;
    out.push({ gainDb: 20 * Math.log10(amp), phaseDeg: ph });
  }
  return out;
}

/** True when every gain is 1 (0 dB, 0°) to within 1e-12, so applying it changes nothing. */
export function isUnitGain(states: readonly ElementGainState[]): boolean {
  return states.every((s) => Math.abs(s.gainDb) < 1e-12 && Math.abs(s.phaseDeg) < 1e-12);
}

function inverseGains(gains: ElementGains): ElementGains {
  const m = gains.re.length;
  const re = new Float64Array(m);
  const im = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    const gr = gains.re[i];
    const gi = gains.im[i];
    const den = gr * gr + gi * gi;
    if (!(den > 0) || !Number.isFinite(den)) {
      throw new DoaInputError('bad-value', `element ${i + 1} has a zero or non-finite calibration gain`);
    }
    // 1/g = conj(g) / |g|²
    re[i] = gr / den;
    im[i] = -gi / den;
  }
  return { re, im };
}

/**
 * Divides element m's samples by g_m, in a new matrix.
 * `layout` says which dimension is the element: 'elements-by-snapshots' (M × N, row m = element m)
 * or 'snapshots-by-elements' (N × M, the snapshot-file layout of docs/conventions.md §6, column m = element m).
 * Throws DoaInputError when the element count differs or a gain is zero or not finite.
 */
export function applyElementGains(
  x: ComplexMatrix,
  gains: ElementGains,
  layout: 'elements-by-snapshots' | 'snapshots-by-elements',
): ComplexMatrix {
  const m = gains.re.length;
  const elements = layout === 'elements-by-snapshots' ? x.rows : x.cols;
  if (elements !== m) {
    throw new DoaInputError('bad-size', `the snapshots have ${elements} elements but the calibration has ${m} gains`);
  }
  const inv = inverseGains(gains);
  const re = new Float64Array(x.rows * x.cols);
  const im = new Float64Array(x.rows * x.cols);
  for (let r = 0; r < x.rows; r++) {
    const o = r * x.cols;
    for (let c = 0; c < x.cols; c++) {
      const e = layout === 'elements-by-snapshots' ? r : c;
      const a = x.re[o + c];
      const b = x.im[o + c];
      re[o + c] = a * inv.re[e] - b * inv.im[e];
      im[o + c] = a * inv.im[e] + b * inv.re[e];
    }
  }
  return { rows: x.rows, cols: x.cols, re, im };
}
