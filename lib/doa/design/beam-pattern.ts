/**
 * Tapers (amplitude weights) and beam patterns of a uniform linear array.
 *
 * Geometry and angles follow docs/conventions.md §1: element m = 0 … M−1 at x_m = m·d,
 * d in wavelengths, bearings θ in degrees from broadside in [−90, 90], u = sin θ.
 * The array factor steered to θ0 is
 *   AF(u) = Σ_m e_m · w_m · g_m · exp(+j·2π·d·m·(u − u0)),
 * with w_m the taper, e_m ∈ {0, 1} the enabled flag and
 * g_m = 10^(gainDb_m/20) · exp(+j·phaseDeg_m·π/180) the element's complex
 * calibration (the gain and phase the element contributes to the beamformer
 * output; 0 dB and 0° mean an ideal element).
 *
 * Patterns are returned in dB as 20·log10(|AF| / ref) on Float64Array. The
 * default reference ('coherent') is Σ_m e_m·w_m·|g_m|, the largest |AF| can
 * reach, so an ideal array reads 0 dB at the steering angle and phase errors
 * show as a loss. 'peak' divides by the largest |AF| on the given grid.
 * Values below `floorDb` (default −150 dB) are clamped so exact nulls stay finite.
 *
 * Tapers are symmetric, real and normalised to a largest weight of 1:
 *  - uniform: all ones;
 *  - hann: w_m = sin²(π(m+1)/(M+1)) (no zero end weights, so every element
 *    contributes; this equals scipy.signal.windows.hann(M+2)[1:-1]);
 *  - hamming: w_m = 0.54 − 0.46·cos(2πm/(M−1)) (scipy's symmetric Hamming);
 *  - chebyshev: Dolph (1946) weights whose pattern has every sidelobe at
 *    −sidelobeDb (default 30 dB), computed here by sampling the Chebyshev
 *    polynomial pattern and inverting the DFT (checked against
 *    scipy.signal.windows.chebwin fixtures).
 */
import { DoaInputError } from '../errors';
import {
  requireElementCount,
  requireSpacing,
  requireBearing,
  requireFiniteArray,
  requireFinite,
  requirePositive,
} from '../checks';
import { RAD_PER_DEG } from '../angles';

export type TaperKind = 'uniform' | 'hann' | 'hamming' | 'chebyshev';

export interface TaperSpec {
  kind: TaperKind;
  /** Chebyshev only: the sidelobe level in dB below the main lobe, > 0. Default 30. */
  sidelobeDb?: number;
}

/** Default Dolph–Chebyshev sidelobe level, dB below the main lobe. */
export const DEFAULT_CHEBYSHEV_SIDELOBE_DB = 30;

/** Chebyshev polynomial T_n(x) for any real x (cosh form outside [−1, 1]). */
export function chebyshevPolynomial(n: number, x: number): number {
  if (Math.abs(x) <= 1) return Math.cos(n * Math.acos(x));
  const v = Math.cosh(n * Math.acosh(Math.abs(x)));
  return x < 0 && n % 2 === 1 ? -v : v;
}

/**
 * Dolph–Chebyshev weights for M elements with all sidelobes at −sidelobeDb.
 * The centred pattern F(ψ) = T_{M−1}(x0·cos(ψ/2)), x0 = cosh(acosh(r)/(M−1)),
 * r = 10^(sidelobeDb/20), is sampled at ψ_k = 2πk/M and the weights follow from
 * the inverse DFT w_n = (1/M)·Σ_k F(ψ_k)·cos((n − (M−1)/2)·ψ_k). O(M²).
 * Normalised to a largest weight of 1.
 */
export function chebyshevWeights(elements: number, sidelobeDb: number = DEFAULT_CHEBYSHEV_SIDELOBE_DB): Float64Array {
  const m = requireElementCount(elements);
  const sl = requirePositive(sidelobeDb, 'sidelobeDb');
  if (sl > 300) throw new DoaInputError('bad-value', `sidelobeDb must be at most 300 dB, got ${sl}`);
  const order = m - 1;
  const r = Math.pow(10, sl / 20);
  const x0 = Math.cosh(Math.acosh(r) / order);
  const samples = new Float64Array(m);
  for (let k = 0; k < m; k++) samples[k] = chebyshevPolynomial(order, x0 * Math.cos((Math.PI * k) / m));
  const w = new Float64Array(m);
  const center = (m - 1) / 2;
  const half = Math.ceil(m / 2);
  for (let n = 0; n < half; n++) {
    let s = 0;
    for (let k = 0; k < m; k++) s += samples[k] * Math.cos((n - center) * ((2 * Math.PI * k) / m));
    w[n] = s / m;
    w[m - 1 - n] = s / m;
  }
  return normalizeToMax(w);
}

function normalizeToMax(w: Float64Array): Float64Array {
  let max = 0;
  for (let i = 0; i < w.length; i++) max = Math.max(max, Math.abs(w[i]));
  if (max > 0) for (let i = 0; i < w.length; i++) w[i] /= max;
  return w;
}

/** Taper weights for M elements, largest weight 1. */
export function taperWeights(elements: number, taper: TaperSpec | TaperKind = 'uniform'): Float64Array {
  const m = requireElementCount(elements);
  const spec: TaperSpec = typeof taper === 'string' ? { kind: taper } : taper;
  if (spec === null || typeof spec !== 'object')
    throw new DoaInputError('bad-option', 'taper must be a kind or { kind, sidelobeDb }');
  const w = new Float64Array(m);
  switch (spec.kind) {
    case 'uniform':
      w.fill(1);
      return w;
    case 'hann':
      for (let i = 0; i < m; i++) {
        const s = Math.sin((Math.PI * (i + 1)) / (m + 1));
        w[i] = s * s;
      }
      return normalizeToMax(w);
    case 'hamming':
      for (let i = 0; i < m; i++) w[i] = 0.54 - 0.46 * Math.cos((2 * Math.PI * i) / (m - 1));
      return normalizeToMax(w);
    case 'chebyshev':
      return chebyshevWeights(m, spec.sidelobeDb ?? DEFAULT_CHEBYSHEV_SIDELOBE_DB);
    default:
      throw new DoaInputError(
        'bad-option',
        `taper.kind must be uniform, hann, hamming or chebyshev, got ${String((spec as { kind: unknown }).kind)}`,
      );
  }
}

/** Per-element options shared by the pattern and the figures. */
export interface ElementOptions {
  /** Taper, default uniform. Ignored when `weights` is given. */
  taper?: TaperSpec | TaperKind;
  /** Explicit real amplitude weights (length M), instead of a taper. */
  weights?: ArrayLike<number>;
  /** Enabled flags (length M); a disabled element contributes nothing. Default all enabled. */
  enabled?: ArrayLike<boolean | number>;
  /** Per-element gain calibration in dB (length M). Default 0. */
  gainDb?: ArrayLike<number>;
  /** Per-element phase calibration in degrees (length M). Default 0. */
  phaseDeg?: ArrayLike<number>;
}

/** The effective complex element weights e_m·w_m·g_m (split layout, length M). */
export interface EffectiveWeights {
  re: Float64Array;
  im: Float64Array;
  /** True when every weight is real and the set is symmetric about the centre. */
  symmetricReal: boolean;
}

/** Combines taper, enabled flags and calibration into complex weights. */
export function effectiveWeights(elements: number, options: ElementOptions = {}): EffectiveWeights {
  const m = requireElementCount(elements);
  let w: Float64Array;
  if (options.weights !== undefined) {
    w = requireFiniteArray(options.weights, 'weights', m);
    for (let i = 0; i < m; i++)
      if (w[i] < 0) throw new DoaInputError('bad-value', `weights[${i}] must be 0 or more, got ${w[i]}`);
  } else {
    w = taperWeights(m, options.taper ?? 'uniform');
  }
  const re = new Float64Array(m);
  const im = new Float64Array(m);
  let enabledFlags: Float64Array | undefined;
  if (options.enabled !== undefined) {
    const e = options.enabled;
    if (e === null || typeof e !== 'object' || e.length !== m) {
      throw new DoaInputError(
        'bad-size',
        `enabled has ${e && typeof e === 'object' ? e.length : 'no'} entries, expected ${m}`,
      );
    }
    enabledFlags = new Float64Array(m);
    for (let i = 0; i < m; i++) {
      const v = e[i];
      if (v === true || v === 1) enabledFlags[i] = 1;
      else if (v === false || v === 0) enabledFlags[i] = 0;
      else throw new DoaInputError('bad-value', `enabled[${i}] must be true/false (or 1/0), got ${String(v)}`);
    }
  }
  const gain = options.gainDb !== undefined ? requireFiniteArray(options.gainDb, 'gainDb', m) : undefined;
  const phase = options.phaseDeg !== undefined ? requireFiniteArray(options.phaseDeg, 'phaseDeg', m) : undefined;
  let anyEnabled = false;
  for (let i = 0; i < m; i++) {
    const amp = w[i] * (enabledFlags ? enabledFlags[i] : 1) * (gain ? Math.pow(10, gain[i] / 20) : 1);
    const ph = phase ? phase[i] * RAD_PER_DEG : 0;
    re[i] = amp * Math.cos(ph);
    im[i] = amp * Math.sin(ph);
    if (amp > 0) anyEnabled = true;
  }
  if (!anyEnabled)
    throw new DoaInputError('bad-value', 'enabled: every element is disabled or has zero weight; there is no beam');
  let symmetricReal = true;
  const scale = Math.max(...Array.from(re, Math.abs), 1e-300);
  for (let i = 0; i < m && symmetricReal; i++) {
    if (Math.abs(im[i]) > 1e-14 * scale || Math.abs(re[i] - re[m - 1 - i]) > 1e-14 * scale) symmetricReal = false;
  }
  return { re, im, symmetricReal };
}

/**
 * |AF| as a function of the inter-element phase ψ = 2π·d·(u − u0) for given
 * complex weights; evaluated by Horner's rule, O(M) per point.
 */
export function arrayFactorMagnitudeAtPsi(weights: EffectiveWeights, psi: number): number {
  const { re, im } = weights;
  const c = Math.cos(psi);
  const s = Math.sin(psi);
  let ar = 0;
  let ai = 0;
  for (let i = re.length - 1; i >= 0; i--) {
    const tr = ar * c - ai * s + re[i];
    ai = ar * s + ai * c + im[i];
    ar = tr;
  }
  return Math.hypot(ar, ai);
}

/** The reference |AF| for the 'coherent' normalisation: Σ |effective weight|. */
export function coherentGain(weights: EffectiveWeights): number {
  let s = 0;
  for (let i = 0; i < weights.re.length; i++) s += Math.hypot(weights.re[i], weights.im[i]);
  return s;
}

export interface BeamPatternOptions extends ElementOptions {
  elements: number;
  spacingWavelengths: number;
  /** Steering angle θ0 in degrees. Default 0 (broadside). */
  steerDeg?: number;
  /** Bearing grid in degrees, each in [−90, 90]. Default −90…90 in 0.1° steps. */
  thetaDeg?: ArrayLike<number>;
  /** A grid in u = sin θ instead (each in [−1, 1]); exclusive with thetaDeg. */
  u?: ArrayLike<number>;
  /** 'coherent' (default) or 'peak', see the module header. */
  normalize?: 'coherent' | 'peak';
  /** Lowest dB value returned. Default −150. */
  floorDb?: number;
}

export interface BeamPattern {
  /** The grid as given (degrees, or u when `gridKind` is 'u'). */
  grid: Float64Array;
  gridKind: 'thetaDeg' | 'u';
  /** 20·log10(|AF|/ref), clamped at floorDb. */
  valuesDb: Float64Array;
  /** The reference |AF| used for 0 dB. */
  referenceMagnitude: number;
}

/** A uniform bearing grid from startDeg to stopDeg inclusive. */
export function thetaGridDeg(startDeg = -90, stopDeg = 90, stepDeg = 0.1): Float64Array {
  const a = requireBearing(startDeg, 'startDeg');
  const b = requireBearing(stopDeg, 'stopDeg');
  const step = requirePositive(stepDeg, 'stepDeg');
  if (b < a) throw new DoaInputError('bad-value', `stopDeg (${b}) must not be below startDeg (${a})`);
  const n = Math.floor((b - a) / step + 1e-9) + 1;
  if (n > 1_000_001)
    throw new DoaInputError('bad-value', `stepDeg = ${step} gives ${n} points; at most 1 000 001 are allowed`);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = Math.min(b, a + i * step);
  return out;
}

/** Beam pattern in dB over a θ grid or a u grid. O(M) per grid point, no per-point allocation. */
export function beamPattern(options: BeamPatternOptions): BeamPattern {
  if (options === null || typeof options !== 'object')
    throw new DoaInputError('bad-option', 'beamPattern needs an options object');
  const m = requireElementCount(options.elements);
  const d = requireSpacing(options.spacingWavelengths);
  const steer = requireBearing(options.steerDeg ?? 0, 'steerDeg');
  const floorDb = requireFinite(options.floorDb ?? -150, 'floorDb');
  const normalize = options.normalize ?? 'coherent';
  if (normalize !== 'coherent' && normalize !== 'peak')
    throw new DoaInputError('bad-option', `normalize must be 'coherent' or 'peak', got ${String(normalize)}`);
  if (options.thetaDeg !== undefined && options.u !== undefined)
    throw new DoaInputError('bad-option', 'give thetaDeg or u, not both');
  const weights = effectiveWeights(m, options);
  let grid: Float64Array;
  let gridKind: 'thetaDeg' | 'u';
  if (options.u !== undefined) {
    grid = requireFiniteArray(options.u, 'u');
    gridKind = 'u';
    for (let i = 0; i < grid.length; i++)
      if (grid[i] < -1 || grid[i] > 1)
        throw new DoaInputError('bad-value', `u[${i}] must lie in [−1, 1], got ${grid[i]}`);
  } else {
    grid = options.thetaDeg !== undefined ? requireFiniteArray(options.thetaDeg, 'thetaDeg') : thetaGridDeg();
    gridKind = 'thetaDeg';
    for (let i = 0; i < grid.length; i++)
      if (grid[i] < -90 || grid[i] > 90)
        throw new DoaInputError('bad-value', `thetaDeg[${i}] must lie in [−90, 90], got ${grid[i]}`);
  }
  const u0 = Math.sin(steer * RAD_PER_DEG);
  const k = 2 * Math.PI * d;
  const mags = new Float64Array(grid.length);
  let peak = 0;
  for (let i = 0; i < grid.length; i++) {
    const u = gridKind === 'u' ? grid[i] : Math.sin(grid[i] * RAD_PER_DEG);
    const v = arrayFactorMagnitudeAtPsi(weights, k * (u - u0));
    mags[i] = v;
    if (v > peak) peak = v;
  }
  const ref = normalize === 'coherent' ? coherentGain(weights) : peak;
  const valuesDb = new Float64Array(grid.length);
  for (let i = 0; i < grid.length; i++) {
    const db = ref > 0 && mags[i] > 0 ? 20 * Math.log10(mags[i] / ref) : -Infinity;
    valuesDb[i] = db < floorDb ? floorDb : db;
  }
  return { grid, gridKind, valuesDb, referenceMagnitude: ref };
}
