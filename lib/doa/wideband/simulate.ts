/**
 * Broadband time-domain simulation of a uniform line (tests, benchmark, demo).
 *
 * Geometry and sign (docs/conventions.md §9): element m at m·d metres receives
 * a plane wave from θ earlier by τ_m = m·d·sin θ/c, so x_m(t) = Σ_k s_k(t + τ_m,k(t)) + n_m(t).
 * θ_k(t) follows piecewise-linear keyframes, so τ changes sample by sample.
 *
 * Signals: each source is seeded white Gaussian noise through a band-pass FIR
 * (windowed sinc, Blackman window, `firTaps` taps), scaled so that its RMS at an
 * element is `rms` (using the filter's power gain Σh²), switched on and off at
 * startS/endS with 20 ms raised-cosine ramps. Ambient noise is independent
 * Gaussian per element (spatially white, white in frequency) of RMS `noiseRms`.
 *
 * Delays are applied in the time domain, not as a phase per bin: s_k is
 * evaluated at the fractional sample n + τ·fs by a windowed-sinc interpolator
 * (Blackman window, 2·H taps, H = `interpolationHalfLength`), tabulated at
 * 1/4096-sample steps (the nearest row is used: a delay error below 1/8192 sample). Keep the
 * source bands below about 0.8 of Nyquist, where this interpolator is accurate.
 *
 * Random numbers: SeededRandom (xoshiro128**, sim/simulate.ts); one stream per
 * source and one for the noise, derived from `seed`, so a render is the same
 * whatever the chunking.
 */
import { DoaInputError } from '../errors';
import { RAD_PER_DEG } from '../angles';
import { SeededRandom } from '../sim/simulate';

export interface BearingKeyframe {
  tS: number;
  bearingDeg: number;
}

export interface BroadbandSource {
  /** Bearing keyframes, ascending in time; linear between them, held before the first and after the last. */
  trajectory: BearingKeyframe[];
  /** RMS at one element (same units as the samples). */
  rms: number;
  /** Signal band in Hz. */
  bandHz: [number, number];
  /** Active interval in seconds (default the whole recording). */
  startS?: number;
  endS?: number;
}

export interface BroadbandSimulationOptions {
  elements: number;
  spacingM: number;
  propagationSpeedMps: number;
  sampleRate: number;
  durationS: number;
  sources: BroadbandSource[];
  /** RMS of the spatially white ambient noise per element. */
  noiseRms: number;
  seed?: number;
  /** Half-length H of the fractional-delay interpolator (default 16: 32 taps). */
  interpolationHalfLength?: number;
  /** Taps of the source band-pass filter (odd, default 255). */
  firTaps?: number;
}

const TABLE_STEPS = 4096;
const RAMP_S = 0.02;

/** Bearing of a keyframe trajectory at time t, degrees. */
export function bearingAt(trajectory: BearingKeyframe[], tS: number): number {
  if (tS <= trajectory[0].tS) return trajectory[0].bearingDeg;
  for (let i = 1; i < trajectory.length; i++) {
    const a = trajectory[i - 1];
    const b = trajectory[i];
    if (tS <= b.tS) return a.bearingDeg + ((b.bearingDeg - a.bearingDeg) * (tS - a.tS)) / (b.tS - a.tS);
  }
  return trajectory[trajectory.length - 1].bearingDeg;
}

function blackman(v: number): number {
  // v in [−1, 1]
  return 0.42 + 0.5 * Math.cos(Math.PI * v) + 0.08 * Math.cos(2 * Math.PI * v);
}

function sinc(x: number): number {
  return x === 0 ? 1 : Math.sin(Math.PI * x) / (Math.PI * x);
}

/** Band-pass FIR by windowed sinc (Blackman), linear phase, `taps` odd. */
export function bandPassFir(lowHz: number, highHz: number, sampleRate: number, taps: number): Float64Array {
  const h = new Float64Array(taps);
  const mid = (taps - 1) / 2;
  const f1 = lowHz / sampleRate;
  const f2 = highHz / sampleRate;
  for (let n = 0; n < taps; n++) {
    const x = n - mid;
    const ideal = 2 * f2 * sinc(2 * f2 * x) - 2 * f1 * sinc(2 * f1 * x);
    h[n] = ideal * blackman(x / (mid + 1));
  }
  return h;
}

export class BroadbandSimulator {
  readonly options: BroadbandSimulationOptions;
  readonly samplesPerChannel: number;
  private readonly signals: Float32Array[];
  private readonly pad: number;
  private readonly half: number;
  private readonly table: Float64Array; // (TABLE_STEPS + 1) rows × 2H taps
  private readonly noiseSeed: number;

  constructor(options: BroadbandSimulationOptions) {
    const { elements, spacingM, propagationSpeedMps: c, sampleRate: fs, durationS, sources, noiseRms } = options;
    if (!Number.isInteger(elements) || elements < 1)
      throw new DoaInputError('bad-value', `elements ${elements} must be a positive integer`);
    for (const [name, v] of [
      ['spacingM', spacingM],
      ['propagationSpeedMps', c],
      ['sampleRate', fs],
      ['durationS', durationS],
    ] as const) {
      if (!(Number.isFinite(v) && v > 0))
        throw new DoaInputError('bad-value', `${name} ${v} must be a positive number`);
    }
    if (!(noiseRms >= 0)) throw new DoaInputError('bad-value', `noiseRms ${noiseRms} must be ≥ 0`);
    this.options = options;
    this.samplesPerChannel = Math.round(durationS * fs);
    this.half = options.interpolationHalfLength ?? 16;
    const maxDelay = Math.ceil(((elements - 1) * spacingM * fs) / c) + 1;
    this.pad = maxDelay + this.half + 2;
    const seed = options.seed ?? 1;
    this.noiseSeed = (seed * 7919 + 17) | 0;

    const h = this.half;
    this.table = new Float64Array((TABLE_STEPS + 1) * 2 * h);
    for (let r = 0; r <= TABLE_STEPS; r++) {
      const frac = r / TABLE_STEPS;
      // tap i ↔ sample floor(x) − H + 1 + i, offset x − j = frac + H − 1 − i
      for (let i = 0; i < 2 * h; i++) {
        const off = frac + h - 1 - i;
        this.table[r * 2 * h + i] = sinc(off) * blackman(off / h);
      }
    }

    const taps = options.firTaps ?? 255;
    this.signals = sources.map((src, k) => {
      if (!Array.isArray(src.trajectory) || src.trajectory.length === 0) {
        throw new DoaInputError('bad-value', `sources[${k}].trajectory needs at least one keyframe`);
      }
      const [lo, hi] = src.bandHz;
      if (!(lo >= 0 && hi > lo && hi < fs / 2)) {
        throw new DoaInputError(
          'bad-value',
          `sources[${k}].bandHz [${lo}, ${hi}] must satisfy 0 ≤ low < high < ${fs / 2}`,
        );
      }
      const fir = bandPassFir(lo, hi, fs, taps);
      let gain = 0;
      for (let i = 0; i < taps; i++) gain += fir[i] * fir[i];
      const scale = src.rms / Math.sqrt(gain);
      const n = this.samplesPerChannel + 2 * this.pad;
      const rng = new SeededRandom((seed * 104729 + 31 * (k + 1)) | 0);
      const white = new Float64Array(n + taps - 1);
      for (let i = 0; i < white.length; i++) white[i] = rng.normal();
      const out = new Float32Array(n);
      const t0 = src.startS ?? -Infinity;
      const t1 = src.endS ?? Infinity;
      for (let i = 0; i < n; i++) {
        let acc = 0;
        for (let j = 0; j < taps; j++) acc += fir[j] * white[i + j];
        const t = (i - this.pad) / fs;
        let env = 1;
        if (t < t0 || t > t1) env = 0;
        else if (t - t0 < RAMP_S) env = 0.5 - 0.5 * Math.cos((Math.PI * (t - t0)) / RAMP_S);
        else if (t1 - t < RAMP_S) env = 0.5 - 0.5 * Math.cos((Math.PI * (t1 - t)) / RAMP_S);
        out[i] = acc * scale * env;
      }
      return out;
    });
  }

  /**
   * Writes samples start … start + count − 1 of every element into out[m][offset …].
   * Chunks may be rendered in any order; the noise of sample n is drawn from a
   * stream seeded by (seed, chunk start), so render the same chunks for the same data.
   */
  render(start: number, count: number, out: Float32Array[], offset = 0): void {
    const { elements, spacingM, propagationSpeedMps: c, sampleRate: fs, sources, noiseRms } = this.options;
    const h = this.half;
    const taps = 2 * h;
    const table = this.table;
    for (let e = 0; e < elements; e++) out[e].fill(0, offset, offset + count);
    sources.forEach((src, k) => {
      const sig = this.signals[k];
      for (let s = 0; s < count; s++) {
        const n = start + s;
        const t = n / fs;
        const u = Math.sin(bearingAt(src.trajectory, t) * RAD_PER_DEG);
        const perElement = (spacingM * u * fs) / c; // samples of advance per element
        for (let e = 0; e < elements; e++) {
          const x = n + this.pad + e * perElement;
          const base = Math.floor(x);
          const r0 = Math.round((x - base) * TABLE_STEPS) * taps;
          let acc = 0;
          const first = base - h + 1;
          for (let i = 0; i < taps; i++) acc += table[r0 + i] * sig[first + i];
          out[e][offset + s] += acc;
        }
      }
    });
    if (noiseRms > 0) {
      const rng = new SeededRandom((this.noiseSeed ^ Math.imul(start + 1, 2654435761)) | 0);
      for (let s = 0; s < count; s++) {
        for (let e = 0; e < elements; e++) out[e][offset + s] += noiseRms * rng.normal();
      }
    }
  }
}

/** The whole recording in memory, one Float32Array per element (rendered in 1 s chunks). */
export function simulateBroadband(options: BroadbandSimulationOptions): Float32Array[] {
  const sim = new BroadbandSimulator(options);
  const total = sim.samplesPerChannel;
  const out = Array.from({ length: options.elements }, () => new Float32Array(total));
  const chunk = Math.max(1, Math.round(options.sampleRate));
  for (let s = 0; s < total; s += chunk) sim.render(s, Math.min(chunk, total - s), out, s);
  return out;
}
