/**
 * Seeded Monte Carlo accuracy studies: how close each estimator comes to the
 * stochastic Cramér–Rao bound as one variable is swept. Plain TypeScript on
 * lib/doa (no React, Next or database imports), so it runs the same in the
 * server's job queue, in the demo seed and in node tests.
 *
 * Conventions (docs/conventions.md §1–5): a ULA with M elements at spacing d
 * (wavelengths), bearings in degrees from broadside, noise power σ² = 1 per
 * element, so a source power given in dB is its per-element SNR.
 *
 * Scenario and sweep
 *  - Sources: bearingsDeg and powersDb (per-element SNR of each source), an
 *    optional common correlation coefficient ρ (0 … 1) between every pair.
 *  - One swept variable:
 *     'snr'       the value is the SNR (dB) of the first source; the others keep
 *                 their offsets powersDb[k] − powersDb[0];
 *     'snapshots' the value is N;
 *     'elements'  the value is M (spacing unchanged, so the aperture grows).
 *  - The source count K is known to the estimators (a study measures accuracy,
 *    not detection; see the MDL/AIC figures of a dataset for that).
 *  - Covariance: sample covariance → forward spatial smoothing (subarray L,
 *    'auto' = ⌈2M/3⌉ clamped to 2 … M−1, the engine's recommended size) →
 *    forward–backward averaging, exactly the engine's order (docs/conventions.md §2).
 *  - Spectral methods (music, bartlett, mvdr) pick peaks on the default
 *    0.01° grid (docs/conventions.md §4), so their errors are quantised at 0.005°.
 *
 * Random numbers: trial t of every sweep point uses the same seed
 * (seed, t) → 32-bit mix, so the points share their random draws ("common
 * random numbers": the curves are smooth and differences between points are
 * not sampling noise). All methods at a trial see the same snapshots.
 *
 * Per point and method
 *  - rmseDeg: √(mean over trials and sources of the squared error) under the
 *    best pairing (lib/doa pairedRmse; sorted order is optimal on a line).
 *    Every trial counts, outliers included — that is how a threshold shows.
 *  - rmsePerSourceDeg: the same per true source (sources in ascending bearing).
 *  - rmseInliersDeg: the same over the trials that are not outliers.
 *  - matchingDistanceDeg: the 50th, 90th and 95th percentiles of the matching
 *    distance (lib/doa matchingDistance: the largest error of the best pairing).
 *  - resolutionProbability (K ≥ 2 only, else null): the share of trials in which
 *    the method returned K bearings and every paired estimate lies within half
 *    the separation between its true source and that source's nearest
 *    neighbour. (A common-practice criterion: each estimate is closer to its
 *    own source than the midpoint to the next one.)
 *  - outlierRate: the share of trials in which the method returned fewer than
 *    K bearings, or some paired estimate is off by more than half the Rayleigh
 *    gap 1/(M·d) in u = sin θ (docs/conventions.md §5) — the estimate is then outside
 *    the main lobe of its source: common practice for the threshold region.
 *  - crbStdDeg: the stochastic CRB std per source (lib/doa stochasticCrb,
 *    Stoica & Nehorai 1990) for the full M-element array and N snapshots.
 *    It assumes uncorrelated sources; with ρ > 0 it is only indicative.
 *
 * Slope: a least-squares line through (log x, log RMSE) on the upper half of
 * the sweep values (at least two points) among the points with an outlier
 * rate ≤ 1 %, where x is the linear SNR, N or M. Expected (docs/references.md §9):
 * −0.5 against SNR at high SNR, −0.5 against N, about −1.5 against M.
 *
 * Budget: the work is estimated in floating-point operations (a rough count,
 * see `estimateStudyCost`) and refused above STUDY_COST_BUDGET with a message
 * that says how to shrink the study. On this project's 2-core machine one
 * budget is about a minute of compute.
 */
import {
  DEFAULT_GRID,
  DOA_METHODS,
  METHOD_RUNNERS,
  forwardBackward,
  hermitianEigen,
  matchingDistance,
  pairedRmse,
  recommendedSmoothingSubarray,
  sampleCovariance,
  simulateSnapshots,
  spatialSmoothing,
  stochasticCrb,
  type DoaMethod,
} from '../doa';

export const SWEEP_VARIABLES = ['snr', 'snapshots', 'elements'] as const;
export type SweepVariable = (typeof SWEEP_VARIABLES)[number];

export interface StudySpec {
  /** Element count M (replaced by the sweep values when sweeping 'elements'). */
  elements: number;
  /** Spacing d in wavelengths. */
  spacingWavelengths: number;
  /** True bearings, degrees, strictly inside (−90, 90). */
  bearingsDeg: number[];
  /** Per-element SNR of each source in dB (noise power 1). */
  powersDb: number[];
  /** Common correlation coefficient between every pair of sources, 0 … 1. Default 0. */
  correlation?: number;
  /** Snapshot count N (replaced by the sweep values when sweeping 'snapshots'). */
  snapshots: number;
  sweep: { variable: SweepVariable; values: number[] };
  methods: DoaMethod[];
  /** Trials per sweep point. */
  trials: number;
  /** Integer seed. */
  seed: number;
  /** Forward–backward averaging. Default false. */
  forwardBackward?: boolean;
  /** Spatial smoothing subarray: a size, 'auto' (⌈2M/3⌉) or 'none' (default). */
  smoothing?: number | 'auto' | 'none';
}

export interface MethodPoint {
  method: DoaMethod;
  rmseDeg: number;
  rmsePerSourceDeg: number[];
  rmseInliersDeg: number | null;
  matchingDistanceDeg: { p50: number; p90: number; p95: number };
  resolutionProbability: number | null;
  outlierRate: number;
  /** rmseDeg / √(mean CRB variance over sources). */
  rmseOverCrb: number;
}

export interface StudyPoint {
  value: number;
  elements: number;
  snapshots: number;
  snrDb: number[];
  smoothingSubarray: number | null;
  crbStdDeg: number[];
  /** √(mean of the CRB variances over sources), the curve drawn with the RMSE. */
  crbRmsDeg: number;
  methods: MethodPoint[];
}

export interface StudyResult {
  variable: SweepVariable;
  points: StudyPoint[];
  /** Fitted log–log slopes of RMSE (and of √CRB) against the swept variable; null when too few points qualify. */
  slopes: Array<{ method: DoaMethod | 'crb'; slope: number | null; fittedValues: number[] }>;
  trials: number;
  seed: number;
  cost: number;
  elapsedMs: number;
}

export class StudyInputError extends RangeError {
  constructor(
    readonly field: string,
    message: string,
  ) {
    super(message);
    this.name = 'StudyInputError';
  }
}

export class StudyBudgetError extends RangeError {
  constructor(
    readonly cost: number,
    readonly budget: number,
    message: string,
  ) {
    super(message);
    this.name = 'StudyBudgetError';
  }
}

export class StudyAbortedError extends Error {
  constructor() {
    super('The study was stopped before it finished.');
    this.name = 'StudyAbortedError';
  }
}

/** Estimated floating-point operations a study may use (about a minute on this project's 2-core machine). */
export const STUDY_COST_BUDGET = 1e11;
export const STUDY_LIMITS = {
  maxValues: 24,
  maxTrials: 5000,
  maxElements: 128,
  maxSnapshots: 100000,
  maxSources: 8,
  maxSnrDb: 60,
  minSnrDb: -40,
} as const;
/** Outlier-rate ceiling for a point to enter the slope fit. */
export const SLOPE_MAX_OUTLIER_RATE = 0.01;

const SPECTRAL = new Set<DoaMethod>(['music', 'bartlett', 'mvdr']);
const GRID_POINTS = 18001;

/** The smoothing subarray used at M elements, or null for none. */
export function smoothingSubarrayFor(spec: Pick<StudySpec, 'smoothing'>, elements: number): number | null {
  const s = spec.smoothing ?? 'none';
  if (s === 'none') return null;
  if (s === 'auto') return recommendedSmoothingSubarray(elements);
  return s;
}

/** Resolved M, N and per-source SNR (dB) at one sweep value. */
export function pointScenario(
  spec: StudySpec,
  value: number,
): { elements: number; snapshots: number; snrDb: number[] } {
  const v = spec.sweep.variable;
  return {
    elements: v === 'elements' ? value : spec.elements,
    snapshots: v === 'snapshots' ? value : spec.snapshots,
    snrDb: v === 'snr' ? spec.powersDb.map((p) => value + (p - spec.powersDb[0])) : spec.powersDb.slice(),
  };
}

/**
 * Rough operation count of one trial at (M, N, K, L) for the given methods:
 * simulation 8·M·N·(K+1), sample covariance 4·M²·N, EVD 20·L³, ESPRIT 60·L³,
 * root-MUSIC 40·(2L)³ (companion-matrix roots), spectra 8·grid·L·(L−K) (+ mvdr
 * inverse), plus fixed overheads (allocation, small-matrix set-up) that dominate
 * small arrays. Calibrated against timings on this project's 2-core machine
 * (about 2e6 counted operations per millisecond); it is a guard, not a prediction.
 */
const TRIAL_OVERHEAD = 1e6;
const METHOD_OVERHEAD = 2e6;

export function trialCost(m: number, n: number, k: number, l: number, methods: readonly DoaMethod[]): number {
  let c = TRIAL_OVERHEAD + 8 * m * n * (k + 1) + 4 * m * m * n + 20 * l ** 3;
  for (const method of methods) {
    c += METHOD_OVERHEAD;
    if (SPECTRAL.has(method)) c += 8 * GRID_POINTS * l * Math.max(1, l - k) + 20 * l ** 3;
    else if (method === 'root-music') c += 40 * (2 * l) ** 3;
    else c += 60 * l ** 3;
  }
  return c;
}

export function estimateStudyCost(spec: StudySpec): number {
  let total = 0;
  for (const value of spec.sweep.values) {
    const p = pointScenario(spec, value);
    const l = smoothingSubarrayFor(spec, p.elements) ?? p.elements;
    total += spec.trials * trialCost(p.elements, p.snapshots, spec.bearingsDeg.length, l, spec.methods);
  }
  return total;
}

function fail(field: string, message: string): never {
  throw new StudyInputError(field, message);
}

function isInt(x: unknown): x is number {
  return typeof x === 'number' && Number.isInteger(x);
}

/** Checks every field (throws StudyInputError naming it), then the budget (throws StudyBudgetError). Returns the cost. */
export function validateStudySpec(spec: StudySpec): number {
  const L = STUDY_LIMITS;
  if (!isInt(spec.elements) || spec.elements < 2 || spec.elements > L.maxElements)
    fail('elements', `elements must be a whole number from 2 to ${L.maxElements}, got ${spec.elements}`);
  if (!(typeof spec.spacingWavelengths === 'number' && spec.spacingWavelengths > 0 && spec.spacingWavelengths <= 100))
    fail('spacingWavelengths', `spacingWavelengths must be a number in (0, 100], got ${spec.spacingWavelengths}`);
  const k = spec.bearingsDeg?.length ?? 0;
  if (k < 1 || k > L.maxSources) fail('bearingsDeg', `give 1 to ${L.maxSources} source bearings, got ${k}`);
  spec.bearingsDeg.forEach((b, i) => {
    if (!(Number.isFinite(b) && b > -90 && b < 90))
      fail('bearingsDeg', `bearing ${i + 1} (${b}) must lie strictly inside −90° … 90°`);
  });
  const sorted = spec.bearingsDeg.slice().sort((a, b) => a - b);
  for (let i = 1; i < k; i++)
    if (sorted[i] === sorted[i - 1]) fail('bearingsDeg', `two sources share the bearing ${sorted[i]}°`);
  if (!Array.isArray(spec.powersDb) || spec.powersDb.length !== k)
    fail('powersDb', `give one power (dB) per source: ${k} bearing(s), ${spec.powersDb?.length ?? 0} power(s)`);
  spec.powersDb.forEach((p, i) => {
    if (!(Number.isFinite(p) && p >= L.minSnrDb && p <= L.maxSnrDb))
      fail('powersDb', `power ${i + 1} (${p} dB) must lie in ${L.minSnrDb} … ${L.maxSnrDb} dB`);
  });
  const rho = spec.correlation ?? 0;
  if (!(Number.isFinite(rho) && rho >= 0 && rho <= 1)) fail('correlation', `correlation must lie in 0 … 1, got ${rho}`);
  if (!isInt(spec.snapshots) || spec.snapshots < 1 || spec.snapshots > L.maxSnapshots)
    fail('snapshots', `snapshots must be a whole number from 1 to ${L.maxSnapshots}, got ${spec.snapshots}`);
  const sweep = spec.sweep;
  if (!sweep || !(SWEEP_VARIABLES as readonly string[]).includes(sweep.variable))
    fail('sweep.variable', `sweep.variable must be one of ${SWEEP_VARIABLES.join(', ')}`);
  if (!Array.isArray(sweep.values) || sweep.values.length < 1 || sweep.values.length > L.maxValues)
    fail('sweep.values', `give 1 to ${L.maxValues} sweep values, got ${sweep.values?.length ?? 0}`);
  const seen = new Set<number>();
  for (const v of sweep.values) {
    if (seen.has(v)) fail('sweep.values', `the sweep value ${v} appears twice`);
    seen.add(v);
    if (sweep.variable === 'snr' && !(Number.isFinite(v) && v >= L.minSnrDb && v <= L.maxSnrDb))
      fail('sweep.values', `SNR ${v} dB must lie in ${L.minSnrDb} … ${L.maxSnrDb} dB`);
    if (sweep.variable === 'snapshots' && !(isInt(v) && v >= 1 && v <= L.maxSnapshots))
      fail('sweep.values', `snapshot count ${v} must be a whole number from 1 to ${L.maxSnapshots}`);
    if (sweep.variable === 'elements' && !(isInt(v) && v >= 2 && v <= L.maxElements))
      fail('sweep.values', `element count ${v} must be a whole number from 2 to ${L.maxElements}`);
  }
  if (sweep.variable === 'snr') {
    const offsets = spec.powersDb.map((p) => p - spec.powersDb[0]);
    for (const v of sweep.values)
      for (const o of offsets) {
        if (v + o < L.minSnrDb || v + o > L.maxSnrDb)
          fail('sweep.values', `at ${v} dB a source would be at ${v + o} dB, outside ${L.minSnrDb} … ${L.maxSnrDb} dB`);
      }
  }
  if (!Array.isArray(spec.methods) || spec.methods.length < 1) fail('methods', 'choose at least one method');
  for (const m of spec.methods)
    if (!(DOA_METHODS as readonly string[]).includes(m))
      fail('methods', `method "${m}" is not one of ${DOA_METHODS.join(', ')}`);
  if (new Set(spec.methods).size !== spec.methods.length) fail('methods', 'a method is listed twice');
  if (!isInt(spec.trials) || spec.trials < 1 || spec.trials > L.maxTrials)
    fail('trials', `trials must be a whole number from 1 to ${L.maxTrials}, got ${spec.trials}`);
  if (!isInt(spec.seed) || spec.seed < 0 || spec.seed > 0xffffffff)
    fail('seed', `seed must be a whole number from 0 to ${0xffffffff}`);
  const s = spec.smoothing ?? 'none';
  if (s !== 'none' && s !== 'auto' && !isInt(s))
    fail('smoothing', `smoothing must be 'none', 'auto' or a subarray size`);
  if (spec.forwardBackward !== undefined && typeof spec.forwardBackward !== 'boolean')
    fail('forwardBackward', 'forwardBackward must be true or false');
  // Sizes at every point: K < L, L ≤ M.
  for (const v of sweep.values) {
    const p = pointScenario(spec, v);
    const l = smoothingSubarrayFor(spec, p.elements) ?? p.elements;
    const where = sweep.variable === 'elements' ? `at M = ${p.elements}` : `with M = ${p.elements}`;
    if (l < 2 || l > p.elements)
      fail('smoothing', `the smoothing subarray ${l} must lie in 2 … ${p.elements} ${where}`);
    if (k >= l)
      fail(
        sweep.variable === 'elements' ? 'sweep.values' : 'bearingsDeg',
        `${k} source(s) need more than ${k} effective elements; ${where} there are ${l}`,
      );
  }
  const cost = estimateStudyCost(spec);
  if (cost > STUDY_COST_BUDGET) {
    const factor = Math.ceil(cost / STUDY_COST_BUDGET);
    const maxTrials = Math.max(1, Math.floor((spec.trials * STUDY_COST_BUDGET) / cost));
    const spectral = spec.methods.filter((m) => SPECTRAL.has(m));
    const hints = [`use at most ${maxTrials} trials per point`, 'fewer sweep values', 'fewer methods'];
    if (spectral.length) hints.push(`drop the grid-search methods (${spectral.join(', ')}), which cost the most`);
    if (sweep.variable === 'elements' || sweep.variable === 'snapshots')
      hints.push(`smaller ${sweep.variable === 'elements' ? 'element counts' : 'snapshot counts'}`);
    else hints.push('fewer snapshots or elements');
    throw new StudyBudgetError(
      cost,
      STUDY_COST_BUDGET,
      `The study is about ${factor}× over the compute budget (estimated ${cost.toExponential(2)} operations, limit ${STUDY_COST_BUDGET.toExponential(0)}); shrink it: ${hints.join('; ')}.`,
    );
  }
  return cost;
}

/** Seed of trial t: a 32-bit mix of (seed, t) (splitmix32 finaliser). */
export function trialSeed(seed: number, trial: number): number {
  let z = (Math.imul(seed >>> 0, 0x9e3779b1) + Math.imul(trial + 1, 0x85ebca6b)) >>> 0;
  z = Math.imul(z ^ (z >>> 16), 0x7feb352d) >>> 0;
  z = Math.imul(z ^ (z >>> 15), 0x846ca68b) >>> 0;
  return (z ^ (z >>> 16)) >>> 0;
}

function percentile(sortedValues: number[], q: number): number {
  if (sortedValues.length === 0) return NaN;
  const pos = (sortedValues.length - 1) * q;
  const lo = Math.floor(pos);
  const hi = Math.ceil(pos);
  return sortedValues[lo] + (sortedValues[hi] - sortedValues[lo]) * (pos - lo);
}

/** Least-squares slope of log y against log x; null when fewer than two usable points. */
export function logLogSlope(x: number[], y: number[]): number | null {
  const px: number[] = [];
  const py: number[] = [];
  for (let i = 0; i < x.length; i++) {
    if (x[i] > 0 && y[i] > 0 && Number.isFinite(y[i])) {
      px.push(Math.log(x[i]));
      py.push(Math.log(y[i]));
    }
  }
  if (px.length < 2) return null;
  const mx = px.reduce((a, b) => a + b, 0) / px.length;
  const my = py.reduce((a, b) => a + b, 0) / py.length;
  let sxy = 0;
  let sxx = 0;
  for (let i = 0; i < px.length; i++) {
    sxy += (px[i] - mx) * (py[i] - my);
    sxx += (px[i] - mx) ** 2;
  }
  return sxx > 0 ? sxy / sxx : null;
}

/** The x of a sweep value on the log axis: linear SNR for 'snr', the count otherwise. */
export function sweepAxisValue(variable: SweepVariable, value: number): number {
  return variable === 'snr' ? 10 ** (value / 10) : value;
}

export interface RunStudyOptions {
  /** Called with the finished share (0 … 1) after every chunk of trials. */
  onProgress?: (fraction: number) => void | Promise<void>;
  signal?: AbortSignal;
  /** Awaited between chunks so a server can serve other requests (e.g. setImmediate). */
  yieldControl?: () => Promise<void>;
  /** Trials between progress reports and yields. Default 10. */
  chunk?: number;
}

/** Runs the study. Validates first (StudyInputError / StudyBudgetError); honours the abort signal between chunks. */
export async function runStudy(spec: StudySpec, options: RunStudyOptions = {}): Promise<StudyResult> {
  const cost = validateStudySpec(spec);
  const started = Date.now();
  const chunk = Math.max(1, options.chunk ?? 10);
  const order = spec.bearingsDeg.map((b, i) => ({ b, p: spec.powersDb[i] })).sort((a, b) => a.b - b.b);
  const truth = order.map((o) => o.b);
  const sortedSpec: StudySpec = { ...spec, bearingsDeg: truth, powersDb: order.map((o) => o.p) };
  const k = truth.length;
  const d = spec.spacingWavelengths;
  const uTruth = truth.map((b) => Math.sin((b * Math.PI) / 180));
  // Half the distance to the nearest neighbour source (degrees), per source.
  const halfGap = truth.map((b, i) => {
    let g = Infinity;
    if (i > 0) g = Math.min(g, b - truth[i - 1]);
    if (i < k - 1) g = Math.min(g, truth[i + 1] - b);
    return g / 2;
  });
  const perPointCosts = spec.sweep.values.map((v) => {
    const p = pointScenario(sortedSpec, v);
    const l = smoothingSubarrayFor(spec, p.elements) ?? p.elements;
    return spec.trials * trialCost(p.elements, p.snapshots, k, l, spec.methods);
  });
  const totalCost = perPointCosts.reduce((a, b) => a + b, 0);
  let doneCost = 0;

  const points: StudyPoint[] = [];
  for (let pi = 0; pi < spec.sweep.values.length; pi++) {
    const value = spec.sweep.values[pi];
    const sc = pointScenario(sortedSpec, value);
    const m = sc.elements;
    const n = sc.snapshots;
    const powers = sc.snrDb.map((db) => 10 ** (db / 10));
    const lSmooth = smoothingSubarrayFor(spec, m);
    const crb = Array.from(
      stochasticCrb({
        elements: m,
        spacingWavelengths: d,
        bearingsDeg: truth,
        sourcePowers: powers,
        noisePower: 1,
        snapshots: n,
      }).stdDeg,
    );
    const crbRms = Math.sqrt(crb.reduce((a, s) => a + s * s, 0) / k);
    const outlierU = 1 / (2 * m * d);
    const acc = spec.methods.map(() => ({
      sq: new Float64Array(k),
      sqIn: 0,
      inliers: 0,
      md: [] as number[],
      resolved: 0,
      outliers: 0,
    }));
    const perTrialCost = perPointCosts[pi] / spec.trials;
    for (let t = 0; t < spec.trials; t++) {
      if (t % chunk === 0) {
        if (options.signal?.aborted) throw new StudyAbortedError();
        if (t > 0 || pi > 0) {
          await options.onProgress?.(doneCost / totalCost);
          if (options.yieldControl) await options.yieldControl();
          if (options.signal?.aborted) throw new StudyAbortedError();
        }
      }
      const x = simulateSnapshots({
        elements: m,
        spacingWavelengths: d,
        bearingsDeg: truth,
        powers,
        noisePower: 1,
        snapshots: n,
        seed: trialSeed(spec.seed, t),
        correlation: spec.correlation ?? 0,
      });
      let r = sampleCovariance(x);
      if (lSmooth !== null) r = spatialSmoothing(r, lSmooth);
      if (spec.forwardBackward) r = forwardBackward(r);
      const eig = hermitianEigen(r);
      for (let mi = 0; mi < spec.methods.length; mi++) {
        const a = acc[mi];
        const out = METHOD_RUNNERS[spec.methods[mi]]({
          covariance: r,
          eigenvalues: eig.values,
          eigenvectors: eig.vectors,
          sourceCount: k,
          spacingWavelengths: d,
          grid: DEFAULT_GRID,
        });
        const est = out.bearingsDeg.slice().sort((p, q) => p - q);
        if (est.length !== k) {
          // Missing estimates: count each missing source as a 90° error so the RMSE shows the failure.
          a.outliers++;
          const padded = truth.map((b, i) => est[i] ?? b + 90);
          for (let i = 0; i < k; i++) a.sq[i] += (padded[i] - truth[i]) ** 2;
          a.md.push(90);
          continue;
        }
        let outlier = false;
        let resolved = k >= 2;
        for (let i = 0; i < k; i++) {
          const e = est[i] - truth[i];
          a.sq[i] += e * e;
          if (Math.abs(Math.sin((est[i] * Math.PI) / 180) - uTruth[i]) > outlierU) outlier = true;
          if (!(Math.abs(e) < halfGap[i])) resolved = false;
        }
        const md = matchingDistance(est, truth);
        a.md.push(md);
        if (outlier) a.outliers++;
        else {
          const rm = pairedRmse(est, truth);
          a.sqIn += rm * rm;
          a.inliers++;
        }
        if (resolved) a.resolved++;
      }
      doneCost += perTrialCost;
    }
    const methods: MethodPoint[] = spec.methods.map((method, mi) => {
      const a = acc[mi];
      const perSource = Array.from(a.sq, (s) => Math.sqrt(s / spec.trials));
      const rmse = Math.sqrt(Array.from(a.sq).reduce((p, q) => p + q, 0) / (spec.trials * k));
      const md = a.md.slice().sort((p, q) => p - q);
      return {
        method,
        rmseDeg: rmse,
        rmsePerSourceDeg: perSource,
        rmseInliersDeg: a.inliers > 0 ? Math.sqrt(a.sqIn / a.inliers) : null,
        matchingDistanceDeg: { p50: percentile(md, 0.5), p90: percentile(md, 0.9), p95: percentile(md, 0.95) },
        resolutionProbability: k >= 2 ? a.resolved / spec.trials : null,
        outlierRate: a.outliers / spec.trials,
        rmseOverCrb: rmse / crbRms,
      };
    });
    points.push({
      value,
      elements: m,
      snapshots: n,
      snrDb: sc.snrDb,
      smoothingSubarray: lSmooth,
      crbStdDeg: crb,
      crbRmsDeg: crbRms,
      methods,
    });
  }
  await options.onProgress?.(1);

  const variable = spec.sweep.variable;
  const slopes: StudyResult['slopes'] = [];
  const byValue = points.map((p, i) => ({ p, i })).sort((a, b) => a.p.value - b.p.value);
  const upper = (eligible: (p: StudyPoint) => boolean) => {
    const ok = byValue.filter(({ p }) => eligible(p));
    const take = Math.max(2, Math.ceil(ok.length / 2));
    return ok.slice(Math.max(0, ok.length - take));
  };
  for (let mi = 0; mi < spec.methods.length; mi++) {
    const chosen = upper((p) => p.methods[mi].outlierRate <= SLOPE_MAX_OUTLIER_RATE);
    slopes.push({
      method: spec.methods[mi],
      slope: logLogSlope(
        chosen.map(({ p }) => sweepAxisValue(variable, p.value)),
        chosen.map(({ p }) => p.methods[mi].rmseDeg),
      ),
      fittedValues: chosen.map(({ p }) => p.value),
    });
  }
  const all = upper(() => true);
  slopes.push({
    method: 'crb',
    slope: logLogSlope(
      all.map(({ p }) => sweepAxisValue(variable, p.value)),
      all.map(({ p }) => p.crbRmsDeg),
    ),
    fittedValues: all.map(({ p }) => p.value),
  });
  return { variable, points, slopes, trials: spec.trials, seed: spec.seed, cost, elapsedMs: Date.now() - started };
}
