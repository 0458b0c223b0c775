/**
 * Figures of a uniform linear array: aperture, beamwidths, sidelobes, grating-lobe-free
 * scan, Rayleigh gap and directivity (docs/conventions.md §5, docs/references.md §3–4).
 *
 * Units: spacing d in wavelengths, angles in degrees from broadside (docs/conventions.md §1),
 * u = sin θ, levels in dB relative to the main-lobe peak. The pattern is the array
 * factor of beam-pattern.ts, AF(ψ) = Σ_m c_m·e^{jmψ} with ψ = 2π·d·(u − u0) and
 * c_m the effective weights (taper × enabled × calibration).
 *
 * All beam figures are computed numerically in ψ: the main lobe is the lobe that
 * contains ψ = 0 (the steering direction); its peak and its first minimum on
 * each side are located by a fine scan (16 samples per 2π/M) refined by golden-section
 * search, and the −3.0103 dB (half-power) points by bisection to ~1e−12 rad, far below
 * the required 0.001°. No 0.886 rule is used. Edges beyond u = ±1 are clipped to
 * ±90° and flagged. Sidelobe candidates come from |AF| sampled by one zero-padded FFT
 * (fft.js, ≥ 16 samples per 2π/M); the 16 highest are refined on the exact AF.
 */
import FFT from 'fft.js';
import { DoaInputError } from '../errors';
import { requireElementCount, requireSpacing, requireBearing } from '../checks';
import { RAD_PER_DEG } from '../angles';
import {
  effectiveWeights,
  arrayFactorMagnitudeAtPsi,
  type EffectiveWeights,
  type ElementOptions,
} from './beam-pattern';

/** Aperture (M − 1)·d in wavelengths. */
export function apertureWavelengths(elements: number, spacingWavelengths: number): number {
  return (requireElementCount(elements) - 1) * requireSpacing(spacingWavelengths);
}

/** Grating-lobe-free scan |θ_max| in degrees (docs/conventions.md §5). */
export function gratingLobeFreeScanDeg(spacingWavelengths: number): number {
  const d = requireSpacing(spacingWavelengths);
  if (d <= 0.5) return 90;
  if (d >= 1) return 0;
  return Math.asin(1 / d - 1) / RAD_PER_DEG;
}

/** Largest spacing (wavelengths) free of grating lobes when scanning to ±θ_max: 1/(1 + |sin θ_max|) (docs/references.md §3). */
export function maxSpacingForScan(scanDeg: number): number {
  const t = requireBearing(scanDeg, 'scanDeg');
  return 1 / (1 + Math.abs(Math.sin(t * RAD_PER_DEG)));
}

/** Rayleigh gap 1/(M·d) in u, and asin(min(1, 1/(M·d))) in degrees at broadside (docs/conventions.md §5). */
export function rayleighGap(elements: number, spacingWavelengths: number): { u: number; degAtBroadside: number } {
  const m = requireElementCount(elements);
  const d = requireSpacing(spacingWavelengths);
  const u = 1 / (m * d);
  return { u, degAtBroadside: Math.asin(Math.min(1, u)) / RAD_PER_DEG };
}

// ---------------------------------------------------------------------------
// Main-lobe analysis in ψ

interface MainLobe {
  peakPsi: number;
  peakMagnitude: number;
  /** ψ of the first minimum on each side (negative, positive). */
  nullLeft: number;
  nullRight: number;
  /** ψ of the half-power points. */
  halfLeft: number;
  halfRight: number;
}

const GOLDEN = (Math.sqrt(5) - 1) / 2;

function goldenExtremum(f: (x: number) => number, a: number, b: number, maximize: boolean): { x: number; fx: number } {
  const sign = maximize ? -1 : 1;
  let x1 = b - GOLDEN * (b - a);
  let x2 = a + GOLDEN * (b - a);
  let f1 = sign * f(x1);
  let f2 = sign * f(x2);
  for (let it = 0; it < 200 && b - a > 1e-13 * Math.max(1, Math.abs(a) + Math.abs(b)); it++) {
    if (f1 < f2) {
      b = x2;
      x2 = x1;
      f2 = f1;
      x1 = b - GOLDEN * (b - a);
      f1 = sign * f(x1);
    } else {
      a = x1;
      x1 = x2;
      f1 = f2;
      x2 = a + GOLDEN * (b - a);
      f2 = sign * f(x2);
    }
  }
  const x = (a + b) / 2;
  return { x, fx: f(x) };
}

function bisect(g: (x: number) => number, a: number, b: number): number {
  let ga = g(a);
  for (let it = 0; it < 200; it++) {
    const mid = (a + b) / 2;
    if (mid === a || mid === b) break;
    const gm = g(mid);
    if (gm > 0 === ga > 0) {
      a = mid;
      ga = gm;
    } else b = mid;
  }
  return (a + b) / 2;
}

function analyseMainLobe(w: EffectiveWeights): MainLobe {
  const m = w.re.length;
  const f = (psi: number) => arrayFactorMagnitudeAtPsi(w, psi);
  const h = (2 * Math.PI) / (m * 16);
  // 1. The peak of the lobe containing ψ = 0: climb in whichever direction rises.
  let peakPsi = 0;
  let peakMagnitude = f(0);
  if (!w.symmetricReal) {
    const dir = f(h) >= f(-h) ? 1 : -1;
    let x = 0;
    let fx = peakMagnitude;
    for (let i = 0; i < 32 * m; i++) {
      const fn = f(x + dir * h);
      if (fn <= fx) break;
      x += dir * h;
      fx = fn;
    }
    const ext = goldenExtremum(f, x - h, x + h, true);
    peakPsi = ext.x;
    peakMagnitude = ext.fx;
  }
  if (!(peakMagnitude > 0))
    throw new DoaInputError('bad-value', 'the array factor vanishes at the steering direction; no main lobe');
  // 2. The first minimum on each side.
  const firstMinimum = (dir: 1 | -1): number => {
    let x = peakPsi;
    let fx = peakMagnitude;
    const limit = 2 * Math.PI;
    while (Math.abs(x - peakPsi) < limit) {
      const xn = x + dir * h;
      const fn = f(xn);
      if (fn > fx) {
        const lo = Math.min(x - h, x + h);
        const hi = Math.max(x - h, x + h);
        return goldenExtremum(f, lo, hi, false).x;
      }
      x = xn;
      fx = fn;
    }
    return peakPsi + dir * limit;
  };
  const nullRight = firstMinimum(1);
  const nullLeft = w.symmetricReal ? -nullRight : firstMinimum(-1);
  // 3. Half-power points by bisection between the peak and each null.
  const level = peakMagnitude * Math.SQRT1_2;
  const g = (psi: number) => f(psi) - level;
  const halfRight = g(nullRight) < 0 ? bisect(g, peakPsi, nullRight) : nullRight;
  const halfLeft = w.symmetricReal ? -halfRight : g(nullLeft) < 0 ? bisect(g, peakPsi, nullLeft) : nullLeft;
  return { peakPsi, peakMagnitude, nullLeft, nullRight, halfLeft, halfRight };
}

/** Options for the beam figures: geometry, steering and element options (see beam-pattern.ts). */
export interface FigureOptions extends ElementOptions {
  elements: number;
  spacingWavelengths: number;
  /** Steering angle in degrees, default 0. */
  steerDeg?: number;
}

export interface BeamWidth {
  /** Full width in degrees between the two edges. */
  widthDeg: number;
  /** Full width in u. */
  widthU: number;
  /** Edges in degrees (low, high). */
  edgesDeg: [number, number];
  /** True when an edge fell beyond u = ±1 and was clipped to ±90°. */
  clipped: boolean;
}

function widthFromPsi(psiLeft: number, psiRight: number, u0: number, d: number): BeamWidth {
  const k = 2 * Math.PI * d;
  const uL = u0 + psiLeft / k;
  const uR = u0 + psiRight / k;
  const clipped = uL < -1 || uR > 1;
  const lo = Math.asin(Math.max(-1, uL)) / RAD_PER_DEG;
  const hi = Math.asin(Math.min(1, uR)) / RAD_PER_DEG;
  return { widthDeg: hi - lo, widthU: uR - uL, edgesDeg: [lo, hi], clipped };
}

function prepare(options: FigureOptions): { w: EffectiveWeights; d: number; u0: number; m: number } {
  if (options === null || typeof options !== 'object')
    throw new DoaInputError('bad-option', 'array figures need an options object');
  const m = requireElementCount(options.elements);
  const d = requireSpacing(options.spacingWavelengths);
  const steer = requireBearing(options.steerDeg ?? 0, 'steerDeg');
  return { w: effectiveWeights(m, options), d, u0: Math.sin(steer * RAD_PER_DEG), m };
}

/** Exact half-power (−3.0103 dB) beamwidth, steered and tapered as given. */
export function halfPowerBeamwidth(options: FigureOptions): BeamWidth {
  const { w, d, u0 } = prepare(options);
  const lobe = analyseMainLobe(w);
  return widthFromPsi(lobe.halfLeft, lobe.halfRight, u0, d);
}

/** Half-power beamwidth in degrees (see halfPowerBeamwidth). */
export function halfPowerBeamwidthDeg(options: FigureOptions): number {
  return halfPowerBeamwidth(options).widthDeg;
}

/**
 * HPBW factor k in HPBW_u = k·λ/(M·d) (docs/references.md §4 table): the half-power width in u
 * times M·d. Depends on M and the taper, not on d or steering.
 */
export function halfPowerBeamwidthFactor(options: Omit<FigureOptions, 'steerDeg' | 'spacingWavelengths'>): number {
  const width = halfPowerBeamwidth({ ...options, spacingWavelengths: 0.5, steerDeg: 0 });
  return width.widthU * options.elements * 0.5;
}

/** First-null beamwidth: between the first minima either side of the main lobe. */
export function firstNullBeamwidth(options: FigureOptions): BeamWidth {
  const { w, d, u0 } = prepare(options);
  const lobe = analyseMainLobe(w);
  return widthFromPsi(lobe.nullLeft, lobe.nullRight, u0, d);
}

export function firstNullBeamwidthDeg(options: FigureOptions): number {
  return firstNullBeamwidth(options).widthDeg;
}

/** |AF(2πk/L)| for k = 0 … L−1, L = the power of two ≥ 16·M, by one FFT of the conjugated weights. */
function sampleMagnitudeOnPsiGrid(w: EffectiveWeights): Float64Array {
  const m = w.re.length;
  let size = 16;
  while (size < 16 * m) size *= 2;
  const fft = new FFT(size);
  const input = fft.createComplexArray() as number[];
  const output = fft.createComplexArray() as number[];
  for (let i = 0; i < m; i++) {
    // fft.js computes Σ x_n e^{−j2πkn/L}; with x = conj(c) its magnitude is |Σ c_n e^{+j2πkn/L}|.
    input[2 * i] = w.re[i];
    input[2 * i + 1] = -w.im[i];
  }
  fft.transform(output, input);
  const mags = new Float64Array(size);
  for (let k = 0; k < size; k++) mags[k] = Math.hypot(output[2 * k], output[2 * k + 1]);
  return mags;
}

export interface SidelobeResult {
  /** Highest level outside the main lobe (and outside grating lobes) within the visible region, dB re the main-lobe peak; null when none is visible. */
  peakSidelobeDb: number | null;
  /** Where it lies, in degrees (null with the level). */
  atDeg: number | null;
}

/**
 * Peak sidelobe: the highest level of |AF| over the visible region u ∈ [−1, 1],
 * outside the main lobe (between its first minima) and outside every grating lobe
 * (the main lobe repeated at ψ = 2πk), in dB relative to the main-lobe peak.
 * A partly visible sidelobe counts with its highest visible level. Returns null
 * when no such region is visible (e.g. M = 2, or very short arrays).
 * `region: 'full-period'` ignores the visible-region limit and scans one whole
 * period of ψ (a property of the weights alone, as in window tables).
 */
export function peakSidelobe(options: FigureOptions & { region?: 'visible' | 'full-period' }): SidelobeResult {
  const { w, d, u0 } = prepare(options);
  const region = options.region ?? 'visible';
  if (region !== 'visible' && region !== 'full-period')
    throw new DoaInputError('bad-option', `region must be 'visible' or 'full-period', got ${String(region)}`);
  const lobe = analyseMainLobe(w);
  const k = 2 * Math.PI * d;
  const twoPi = 2 * Math.PI;
  // Sidelobe intervals of one period: (nullRight + 2πn, nullLeft + 2π(n+1)).
  let a: number;
  let b: number;
  if (region === 'full-period') {
    a = lobe.nullRight;
    b = lobe.nullLeft + twoPi;
  } else {
    a = k * (-1 - u0);
    b = k * (1 - u0);
  }
  const intervals: Array<[number, number]> = [];
  const nFrom = Math.floor((a - lobe.nullLeft) / twoPi) - 1;
  const nTo = Math.ceil((b - lobe.nullRight) / twoPi) + 1;
  for (let n = nFrom; n <= nTo; n++) {
    const lo = Math.max(a, lobe.nullRight + twoPi * n);
    const hi = Math.min(b, lobe.nullLeft + twoPi * (n + 1));
    if (hi > lo) intervals.push([lo, hi]);
  }
  // Periodicity: once one full sidelobe period is covered, the rest repeats it.
  const periodLength = lobe.nullLeft + twoPi - lobe.nullRight;
  const full = intervals.find(([lo, hi]) => hi - lo >= periodLength * (1 - 1e-12));
  const scan = full ? [full] : intervals;
  if (scan.length === 0) return { peakSidelobeDb: null, atDeg: null };
  const f = (psi: number) => arrayFactorMagnitudeAtPsi(w, psi);
  // |AF| on the grid ψ_k = 2πk/L (L ≥ 16·M, a power of two) from one zero-padded FFT,
  // used only to locate candidate maxima; each candidate is then refined on the exact AF.
  const grid = sampleMagnitudeOnPsiGrid(w);
  const gridLength = grid.length;
  type Candidate = { psi: number; value: number; lo: number; hi: number; interior: boolean };
  const candidates: Candidate[] = [];
  const dx = twoPi / gridLength;
  for (const [lo, hi] of scan) {
    candidates.push({ psi: lo, value: f(lo), lo, hi: lo, interior: false });
    candidates.push({ psi: hi, value: f(hi), lo: hi, hi, interior: false });
    const k0 = Math.ceil(lo / dx);
    const k1 = Math.floor(hi / dx);
    const at = (k: number) => grid[((k % gridLength) + gridLength) % gridLength];
    for (let kk = k0 + 1; kk < k1; kk++) {
      const v = at(kk);
      if (v >= at(kk - 1) && v >= at(kk + 1)) {
        const c = kk * dx;
        candidates.push({ psi: c, value: v, lo: Math.max(lo, c - dx), hi: Math.min(hi, c + dx), interior: true });
      }
    }
  }
  candidates.sort((p, q) => q.value - p.value);
  let bestPsi = candidates[0].psi;
  let bestValue = candidates[0].value;
  for (const c of candidates.slice(0, 16)) {
    if (!c.interior) continue;
    const ext = goldenExtremum(f, c.lo, c.hi, true);
    if (ext.fx > bestValue) {
      bestValue = ext.fx;
      bestPsi = ext.x;
    }
  }
  const ratio = bestValue / lobe.peakMagnitude;
  // Map ψ back to a visible bearing (for 'full-period' this may be outside; clip).
  const u = Math.max(-1, Math.min(1, u0 + bestPsi / k));
  return { peakSidelobeDb: ratio > 0 ? 20 * Math.log10(ratio) : -Infinity, atDeg: Math.asin(u) / RAD_PER_DEG };
}

export function peakSidelobeDb(options: FigureOptions & { region?: 'visible' | 'full-period' }): number | null {
  return peakSidelobe(options).peakSidelobeDb;
}

/**
 * Directivity of isotropic elements on a line (docs/references.md §3), steered to θ0:
 *   D = |Σ c_m|² / Σ_m Σ_n c_m·conj(c_n)·e^{−j2πd(m−n)u0}·sinc(2d(m−n)),
 * sinc(x) = sin(πx)/(πx). Returns the linear value and dB. O(M²).
 */
export function directivity(options: FigureOptions): { linear: number; db: number } {
  const { w, d, u0, m } = prepare(options);
  let sr = 0;
  let si = 0;
  for (let i = 0; i < m; i++) {
    sr += w.re[i];
    si += w.im[i];
  }
  let denominator = 0;
  for (let lag = -(m - 1); lag <= m - 1; lag++) {
    // Σ_m c_m conj(c_{m−lag})
    let ar = 0;
    let ai = 0;
    for (let i = Math.max(0, lag); i < Math.min(m, m + lag); i++) {
      const j = i - lag;
      ar += w.re[i] * w.re[j] + w.im[i] * w.im[j];
      ai += w.im[i] * w.re[j] - w.re[i] * w.im[j];
    }
    const x = 2 * d * lag;
    const sinc = lag === 0 ? 1 : Math.sin(Math.PI * x) / (Math.PI * x);
    const ph = -2 * Math.PI * d * lag * u0;
    denominator += (ar * Math.cos(ph) - ai * Math.sin(ph)) * sinc;
  }
  const linear = (sr * sr + si * si) / denominator;
  return { linear, db: 10 * Math.log10(linear) };
}

/** The `metrics` object of the v1 arrays API (docs/conventions.md §5, §7). */
export interface ArrayMetrics {
  apertureWavelengths: number;
  halfPowerBeamwidthDeg: number;
  rayleighGapDeg: number;
  /** Null when no sidelobe is visible (M = 2, or M·d very small). */
  peakSidelobeDb: number | null;
  gratingLobeFreeScanDeg: number;
}

/**
 * Metrics exactly as docs/conventions.md §5 defines them: uniform weights, broadside,
 * all elements enabled, no calibration.
 */
export function arrayMetrics(elements: number, spacingWavelengths: number): ArrayMetrics {
  const m = requireElementCount(elements);
  const d = requireSpacing(spacingWavelengths);
  const base = { elements: m, spacingWavelengths: d, steerDeg: 0 };
  return {
    apertureWavelengths: apertureWavelengths(m, d),
    halfPowerBeamwidthDeg: halfPowerBeamwidthDeg(base),
    rayleighGapDeg: rayleighGap(m, d).degAtBroadside,
    peakSidelobeDb: peakSidelobeDb(base),
    gratingLobeFreeScanDeg: gratingLobeFreeScanDeg(d),
  };
}
