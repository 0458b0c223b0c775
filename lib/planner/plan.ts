/**
 * Aperture planner: from a bearing-accuracy and resolution target to the element count, spacing
 * and snapshot count of a uniform linear array. Plain TypeScript on lib/doa; no React, Next or
 * database imports.
 *
 * Conventions (docs/conventions.md §1, §5): bearings in degrees from broadside; spacing d in
 * wavelengths λ = c/f (also given in metres); SNR per element, noise power 1; N snapshots.
 *
 * Choices (stated once, shown with every answer in `assumptions`):
 *  - Spacing. Unless `spacingM` is fixed, the largest spacing free of grating lobes over the
 *    whole scan sector ±θs at the HIGHEST frequency of the band, d = 1/(1 + sin θs) wavelengths
 *    (docs/references.md §3), rounded DOWN to three significant figures in metres (a buildable
 *    number that keeps the sector grating-lobe free).
 *  - Accuracy and resolution are evaluated at the LOWEST frequency of the band (the worst case:
 *    the spacing is fewest wavelengths there, and the bound grows like (λ/d)²).
 *  - Predicted σ = √(stochastic CRB) of one source at atBearingDeg (lib/doa `stochasticCrb`,
 *    Stoica & Nehorai 1990) × the method's first-order efficiency factor (efficiency.ts: a closed
 *    form for LS/TLS-ESPRIT, computed, not a measured table).
 *  - Resolution: two equal uncorrelated sources at atBearingDeg ± resolveDeg/2, each at the
 *    given SNR, are resolvable when resolveDeg ≥ √(C11 + C22 − 2C12) of their stochastic CRB
 *    (Smith 2005, as lib/doa `statisticalResolutionLimit`). `resolutionProbability` is NOT
 *    modelled: it is carried to the Monte Carlo verification, which measures it.
 *  - Snapshots: `snapshots` is the budget; or N = floor(integrationSeconds × bandwidthHz)
 *    independent snapshots (common practice: one independent snapshot per 1/B seconds).
 *    Every candidate also has N ≥ M (a full-rank sample covariance; the engine warns below it).
 *  - Candidates: for each M the fewest N meeting every target; the Pareto front of (M, N)
 *    (each candidate needs strictly fewer snapshots than every candidate with fewer elements).
 *    The first candidate (fewest elements) is the recommended one.
 */
import { gratingLobeFreeScanDeg, maxSpacingForScan, statisticalResolutionLimit, stochasticCrb } from '@/lib/doa';
import { efficiencyFactor, type PlannerMethod } from './efficiency';

export interface PlanInput {
  /** Lowest and highest analysis frequency, Hz (equal for a single frequency). */
  band: { lowHz: number; highHz: number };
  /** Propagation speed, m/s (already resolved from a medium). */
  propagationSpeedMps: number;
  /** Half-width of the scan sector, degrees: bearings −θs … +θs. */
  scanSectorDeg: number;
  targets: { accuracyDeg: number; atBearingDeg: number; resolveDeg?: number; resolutionProbability?: number };
  snrDbPerElement: number;
  /** Snapshot budget N (the largest N a candidate may use). */
  snapshotBudget: number;
  /** Which request field set the budget (named by an infeasibility error). */
  snapshotField: 'snapshots' | 'integrationSeconds';
  method: PlannerMethod;
  smoothing: 'none' | 'auto';
  forwardBackward: boolean;
  constraints: { maxElements?: number; maxApertureM?: number; spacingM?: number; minSpacingM?: number };
}

export interface PlanCandidate {
  elements: number;
  /** Spacing in wavelengths at the highest frequency (the grating-lobe design frequency). */
  spacingWavelengths: number;
  /** Spacing in wavelengths at the evaluation (lowest) frequency. */
  spacingWavelengthsAtEvaluation: number;
  spacingM: number;
  snapshots: number;
  /** What sets N: the accuracy target, the resolution target, or N ≥ M. */
  snapshotsSetBy: 'accuracy' | 'resolution' | 'rank';
  apertureM: number;
  smoothingSubarray: number | null;
  crbStdDeg: number;
  efficiencyFactor: number;
  predictedStdDeg: number;
  /** Smith (2005) limit for the equal pair centred at atBearingDeg; null when M < 3 or none in view. */
  statisticalResolutionDeg: number | null;
  /** The Rayleigh gap 1/(M·d) in u as a separation centred at atBearingDeg, 2·asin(Δu/(2cos θ0)); null beyond view. */
  rayleighGapDeg: number | null;
  gratingLobeFreeScanDeg: number;
  margins: {
    /** accuracyDeg − predictedStdDeg (≥ 0 meets the target). */
    accuracyDeg: number;
    /** resolveDeg − statisticalResolutionDeg (≥ 0 meets the target), when a resolution target is set. */
    resolutionDeg: number | null;
    /** gratingLobeFreeScanDeg − scanSectorDeg (≥ 0: the sector is free of grating lobes). */
    scanDeg: number;
  };
}

export interface PlanResult {
  candidates: PlanCandidate[];
  recommendedIndex: number;
  evaluation: { frequencyHz: number; wavelengthM: number; spacingWavelengths: number };
  gratingLobeDesign: { frequencyHz: number; wavelengthM: number; maxSpacingWavelengths: number };
  snapshotBudget: number;
  elementLimit: number;
  /** The elements–snapshots plane for the chart: per M, σ at N = 1 (σ(N) = σ1/√N) and the N the resolution target needs. */
  plane: { elements: number[]; sigmaAtOneSnapshotDeg: number[]; resolutionSnapshots: number[] | null };
  assumptions: string[];
}

/** A target no allowed design meets: `field` is the binding constraint (a dotted request path). */
export class PlanInfeasibleError extends Error {
  constructor(
    readonly field: string,
    message: string,
    readonly fields: Record<string, string[]> = { [field]: [message] },
  ) {
    super(message);
    this.name = 'PlanInfeasibleError';
  }
}

export const PLANNER_DEFAULT_MAX_ELEMENTS = 128;
const DEG = Math.PI / 180;

/** Round down to three significant figures. */
export function floorSignificant(x: number, digits = 3): number {
  const e = Math.floor(Math.log10(x)) - (digits - 1);
  const scale = Math.pow(10, e);
  const v = Math.floor(x / scale + 1e-9) * scale;
  return Number(v.toPrecision(digits));
}

const fmt = (x: number, digits = 3) => Number(x.toPrecision(digits)).toString();

interface Setting {
  d: number; // wavelengths at evaluation
  theta: number; // degrees
  snr: number;
  input: PlanInput;
}

function smoothingFor(input: PlanInput, m: number): number | null {
  if (input.smoothing === 'none' || input.method === 'root-music') return null;
  return Math.max(2, Math.min(m - 1, Math.ceil((2 * m) / 3)));
}

/** σ at N = 1 (degrees) and its parts. */
function accuracyAtOne(s: Setting, m: number) {
  const crb1 = stochasticCrb({
    elements: m,
    spacingWavelengths: s.d,
    bearingsDeg: [s.theta],
    sourcePowers: [s.snr],
    noisePower: 1,
    snapshots: 1,
  }).stdDeg[0];
  const eta = efficiencyFactor({
    method: s.input.method,
    elements: m,
    spacingWavelengths: s.d,
    bearingDeg: s.theta,
    snr: s.snr,
    smoothingSubarray: smoothingFor(s.input, m),
    forwardBackward: s.input.forwardBackward,
  });
  return { crb1, eta, sigma1: crb1 * eta };
}

/** √(C11 + C22 − 2C12) at N = 1 for the equal pair δ apart centred on θ, radians. */
function separationStdAtOne(s: Setting, m: number, deltaDeg: number): number {
  const r = stochasticCrb({
    elements: m,
    spacingWavelengths: s.d,
    bearingsDeg: [s.theta - deltaDeg / 2, s.theta + deltaDeg / 2],
    sourcePowers: [s.snr, s.snr],
    noisePower: 1,
    snapshots: 1,
  }).covarianceRad2;
  return Math.sqrt(Math.max(0, r[0] + r[3] - 2 * r[1]));
}

/** Smallest n ≥ 1 with f(n) true, where f is monotone and f(n) ⇔ a/n ≤ b (a, b > 0). */
function smallestN(a: number, b: number): number {
  let n = Math.max(1, Math.ceil(a / b));
  while (n > 1 && a / (n - 1) <= b) n--;
  while (a / n > b) n++;
  return n;
}

interface Need {
  nAccuracy: number;
  nResolution: number;
  n: number;
  setBy: PlanCandidate['snapshotsSetBy'];
  sigma1: number;
  crb1: number;
  eta: number;
}

function needAt(s: Setting, m: number): Need {
  const t = s.input.targets;
  const { sigma1, crb1, eta } = accuracyAtOne(s, m);
  // σ(N) = σ1/√N ≤ target ⇔ σ1²/N ≤ target².
  const nAccuracy = smallestN(sigma1 * sigma1, t.accuracyDeg * t.accuracyDeg);
  let nResolution = 1;
  if (t.resolveDeg !== undefined) {
    const sep1 = separationStdAtOne(s, m, t.resolveDeg);
    const delta = t.resolveDeg * DEG;
    nResolution = smallestN(sep1 * sep1, delta * delta);
  }
  const n = Math.max(nAccuracy, nResolution, m);
  const setBy: Need['setBy'] = n === nAccuracy ? 'accuracy' : n === nResolution ? 'resolution' : 'rank';
  return { nAccuracy, nResolution, n, setBy, sigma1, crb1, eta };
}

function centredRayleighGapDeg(m: number, d: number, theta: number): number | null {
  const gapU = 1 / (m * d);
  const arg = gapU / (2 * Math.cos(theta * DEG));
  if (arg > 1) return null;
  const delta = 2 * Math.asin(arg);
  if (Math.abs(theta * DEG) + delta / 2 >= Math.PI / 2) return null;
  return delta / DEG;
}

/** Plans the array; throws PlanInfeasibleError naming the binding constraint when no design fits. */
export function planAperture(input: PlanInput): PlanResult {
  const { band, propagationSpeedMps: c, targets: t, constraints: k } = input;
  const lambdaHigh = c / band.highHz;
  const lambdaLow = c / band.lowHz;
  const sector = input.scanSectorDeg;
  if (Math.abs(t.atBearingDeg) > sector)
    throw new PlanInfeasibleError(
      'targets.atBearingDeg',
      `targets.atBearingDeg (${fmt(t.atBearingDeg)}°) lies outside the scan sector ±${fmt(sector)}°`,
    );
  if (t.resolveDeg !== undefined && Math.abs(t.atBearingDeg) + t.resolveDeg / 2 >= 90)
    throw new PlanInfeasibleError(
      'targets.resolveDeg',
      `a pair ${fmt(t.resolveDeg)}° apart centred at ${fmt(t.atBearingDeg)}° reaches endfire; use a smaller separation or a bearing nearer broadside`,
    );

  // Spacing.
  const maxD = maxSpacingForScan(sector);
  const maxSpacingM = maxD * lambdaHigh;
  let spacingM: number;
  if (k.spacingM !== undefined) {
    if (k.spacingM > maxSpacingM * (1 + 1e-12))
      throw new PlanInfeasibleError(
        'constraints.spacingM',
        `constraints.spacingM (${fmt(k.spacingM * 1000)} mm) has grating lobes inside ±${fmt(sector)}° at ${fmt(band.highHz)} Hz: the largest grating-lobe-free spacing is ${fmt(maxSpacingM * 1000)} mm (${fmt((k.spacingM / maxSpacingM - 1) * 100)} % too wide)`,
      );
    spacingM = k.spacingM;
  } else {
    spacingM = floorSignificant(maxSpacingM);
    if (k.minSpacingM !== undefined && spacingM < k.minSpacingM) {
      if (k.minSpacingM > maxSpacingM * (1 + 1e-12))
        throw new PlanInfeasibleError(
          'constraints.minSpacingM',
          `constraints.minSpacingM (${fmt(k.minSpacingM * 1000)} mm) exceeds the largest grating-lobe-free spacing over ±${fmt(sector)}° at ${fmt(band.highHz)} Hz, ${fmt(maxSpacingM * 1000)} mm, by ${fmt((k.minSpacingM - maxSpacingM) * 1000)} mm`,
        );
      spacingM = k.minSpacingM;
    }
  }
  if (k.spacingM !== undefined && k.minSpacingM !== undefined && k.spacingM < k.minSpacingM)
    throw new PlanInfeasibleError(
      'constraints.spacingM',
      `constraints.spacingM (${fmt(k.spacingM * 1000)} mm) is below constraints.minSpacingM (${fmt(k.minSpacingM * 1000)} mm)`,
    );
  const dHigh = spacingM / lambdaHigh;
  const dLow = spacingM / lambdaLow;
  const scanFree = gratingLobeFreeScanDeg(dHigh);

  // Element range.
  const mMin = t.resolveDeg !== undefined ? 3 : 2;
  const byElements = k.maxElements ?? PLANNER_DEFAULT_MAX_ELEMENTS;
  const byAperture = k.maxApertureM !== undefined ? Math.floor(k.maxApertureM / spacingM + 1e-9) + 1 : Infinity;
  const mMax = Math.min(byElements, byAperture);
  const elementField = byAperture < byElements ? 'constraints.maxApertureM' : 'constraints.maxElements';
  if (mMax < mMin) {
    throw new PlanInfeasibleError(
      elementField,
      elementField === 'constraints.maxApertureM'
        ? `constraints.maxApertureM (${fmt(k.maxApertureM!)} m) holds only ${mMax} element(s) at ${fmt(spacingM * 1000)} mm; the targets need at least ${mMin} (aperture ≥ ${fmt((mMin - 1) * spacingM)} m)`
        : `constraints.maxElements (${mMax}) is below the ${mMin} elements the targets need at least`,
    );
  }

  const s: Setting = { d: dLow, theta: t.atBearingDeg, snr: Math.pow(10, input.snrDbPerElement / 10), input };
  const budget = input.snapshotBudget;
  const candidates: PlanCandidate[] = [];
  let best = Infinity;
  const plane: PlanResult['plane'] = {
    elements: [],
    sigmaAtOneSnapshotDeg: [],
    resolutionSnapshots: t.resolveDeg !== undefined ? [] : null,
  };
  const planeLimit = (last: number) => Math.max(2 * last, last + 8);
  for (let m = mMin; m <= mMax; m++) {
    // Past the front (N ≥ M ≥ the fewest N so far) only the chart needs more columns.
    if (m >= best && m > planeLimit(candidates[candidates.length - 1].elements)) break;
    const need = needAt(s, m);
    plane.elements.push(m);
    plane.sigmaAtOneSnapshotDeg.push(need.sigma1);
    plane.resolutionSnapshots?.push(need.nResolution);
    if (need.n > budget || need.n >= best) continue;
    best = need.n;
    const n = need.n;
    const sres = t.resolveDeg !== undefined || m >= 3 ? resolutionLimit(s, m, n) : null;
    const predicted = need.sigma1 / Math.sqrt(n);
    candidates.push({
      elements: m,
      spacingWavelengths: dHigh,
      spacingWavelengthsAtEvaluation: dLow,
      spacingM,
      snapshots: n,
      snapshotsSetBy: need.setBy,
      apertureM: (m - 1) * spacingM,
      smoothingSubarray: smoothingFor(input, m),
      crbStdDeg: need.crb1 / Math.sqrt(n),
      efficiencyFactor: need.eta,
      predictedStdDeg: predicted,
      statisticalResolutionDeg: sres,
      rayleighGapDeg: centredRayleighGapDeg(m, dLow, t.atBearingDeg),
      gratingLobeFreeScanDeg: scanFree,
      margins: {
        accuracyDeg: t.accuracyDeg - predicted,
        resolutionDeg: t.resolveDeg !== undefined && sres !== null ? t.resolveDeg - sres : null,
        scanDeg: scanFree - sector,
      },
    });
  }

  if (candidates.length === 0) throw infeasible(s, mMin, mMax, elementField, budget);
  // The chart shows the plane up to about twice the largest candidate.
  const last = candidates[candidates.length - 1].elements;
  const shown = Math.max(0, Math.min(mMax, planeLimit(last)) - mMin + 1);
  plane.elements.length = Math.min(plane.elements.length, shown);
  plane.sigmaAtOneSnapshotDeg.length = plane.elements.length;
  if (plane.resolutionSnapshots) plane.resolutionSnapshots.length = plane.elements.length;

  return {
    candidates,
    recommendedIndex: 0,
    evaluation: { frequencyHz: band.lowHz, wavelengthM: lambdaLow, spacingWavelengths: dLow },
    gratingLobeDesign: { frequencyHz: band.highHz, wavelengthM: lambdaHigh, maxSpacingWavelengths: maxD },
    snapshotBudget: budget,
    elementLimit: mMax,
    plane,
    assumptions: [
      `Spacing: ${k.spacingM !== undefined ? 'fixed by constraints.spacingM' : k.minSpacingM !== undefined && spacingM === k.minSpacingM ? 'constraints.minSpacingM' : `the largest grating-lobe-free spacing over ±${fmt(sector)}° at the highest frequency, ${fmt(band.highHz)} Hz (1/(1 + sin θs) wavelengths, rounded down to 3 significant figures)`}.`,
      `Accuracy and resolution are evaluated at the lowest frequency, ${fmt(band.lowHz)} Hz (worst case), where the spacing is ${fmt(dLow, 4)} wavelengths.`,
      `Predicted σ = stochastic CRB (Stoica & Nehorai 1990) of one source at ${fmt(t.atBearingDeg)}° × the first-order efficiency of ${input.method}${smoothingNote(input)} (closed form, not a measured table).`,
      `Resolution: Smith (2005) statistical limit for two equal uncorrelated sources centred at ${fmt(t.atBearingDeg)}°; a resolution probability is not modelled, only measured by Monte Carlo.`,
      `Snapshots: the fewest meeting every target, at most ${budget}, and at least M (full-rank sample covariance).`,
      'Estimates are advisory: below the threshold SNR or snapshot count every method breaks down, and model errors (calibration, coupling, coherent multipath) are not included.',
    ],
  };
}

function smoothingNote(input: PlanInput): string {
  if (input.method === 'root-music') return ' (efficient for one source, Stoica & Nehorai 1989)';
  const parts: string[] = [];
  parts.push(input.smoothing === 'auto' ? 'spatial smoothing at ⌈2M/3⌉' : 'no smoothing (maximal overlap)');
  if (input.forwardBackward || input.method === 'esprit-unitary') parts.push('forward–backward');
  return ` with ${parts.join(', ')}`;
}

function resolutionLimit(s: Setting, m: number, n: number): number | null {
  if (m < 3) return null;
  return statisticalResolutionLimit({
    elements: m,
    spacingWavelengths: s.d,
    centerDeg: s.theta,
    sourcePowers: [s.snr, s.snr],
    noisePower: 1,
    snapshots: n,
  }).deltaDeg;
}

function infeasible(s: Setting, mMin: number, mMax: number, elementField: string, budget: number): PlanInfeasibleError {
  const t = s.input.targets;
  const atMax = needAt(s, mMax);
  const snapField = s.input.snapshotField;
  // The fewest elements that would fit within the snapshot budget (doubling, then bisection).
  const fits = (m: number) => {
    const nd = needAt(s, m);
    return Math.max(nd.nAccuracy, nd.nResolution) <= budget && m <= budget;
  };
  let needM: number | null = null;
  let hi = mMax;
  while (hi < 4096 && !fits(hi)) hi = Math.min(4096, hi * 2);
  if (fits(hi)) {
    let lo = mMax;
    while (hi - lo > 1) {
      const mid = Math.floor((lo + hi) / 2);
      if (fits(mid)) hi = mid;
      else lo = mid;
    }
    needM = hi;
  }
  const which =
    atMax.nAccuracy >= atMax.nResolution
      ? `the accuracy target ${fmt(t.accuracyDeg)}° (best at ${mMax} elements and ${budget} snapshots: ${fmt(atMax.sigma1 / Math.sqrt(budget))}°, ${fmt(atMax.sigma1 / Math.sqrt(budget) / t.accuracyDeg)}× the target)`
      : `the resolution target ${fmt(t.resolveDeg!)}° (at ${mMax} elements and ${budget} snapshots the statistical limit is ${fmt(resolutionLimit(s, mMax, budget) ?? NaN)}°)`;
  const limitText =
    elementField === 'constraints.maxApertureM'
      ? `constraints.maxApertureM (${mMax} elements)`
      : `the element limit (${elementField}, ${mMax}${s.input.constraints.maxElements === undefined ? ' by default' : ''})`;
  const elementMsg =
    needM !== null
      ? `${limitText} binds: ${which} needs at least ${needM} elements within ${budget} snapshots (${needM - mMax} more)`
      : `${limitText} binds: ${which} is not met by any array up to 4096 elements within ${budget} snapshots`;
  const nNeeded = Math.max(atMax.nAccuracy, atMax.nResolution, mMax);
  const snapMsg = `the snapshot budget (${snapField}, ${budget}) binds: ${mMax} elements need ${nNeeded} snapshots (${fmt(nNeeded / budget)}× the budget)`;
  return new PlanInfeasibleError(
    elementField,
    `No design meets the targets. ${elementMsg[0].toUpperCase()}${elementMsg.slice(1)}; or ${snapMsg}.`,
    {
      [elementField]: [elementMsg],
      [snapField]: [snapMsg],
    },
  );
}

/**
 * One design evaluated directly (no search): σ from lib/doa `stochasticCrb` at N snapshots ×
 * the efficiency factor, and Smith's limit from `statisticalResolutionLimit` at N. Used by the
 * page's "what if" readout and by the minimality checks.
 */
export function evaluateDesign(
  input: PlanInput,
  design: { elements: number; spacingWavelengthsAtEvaluation: number; snapshots: number },
): {
  predictedStdDeg: number;
  statisticalResolutionDeg: number | null;
  meetsAccuracy: boolean;
  meetsResolution: boolean;
} {
  const s: Setting = {
    d: design.spacingWavelengthsAtEvaluation,
    theta: input.targets.atBearingDeg,
    snr: Math.pow(10, input.snrDbPerElement / 10),
    input,
  };
  const m = design.elements;
  const crb = stochasticCrb({
    elements: m,
    spacingWavelengths: s.d,
    bearingsDeg: [s.theta],
    sourcePowers: [s.snr],
    noisePower: 1,
    snapshots: design.snapshots,
  }).stdDeg[0];
  const eta = efficiencyFactor({
    method: input.method,
    elements: m,
    spacingWavelengths: s.d,
    bearingDeg: s.theta,
    snr: s.snr,
    smoothingSubarray: smoothingFor(input, m),
    forwardBackward: input.forwardBackward,
  });
  const predictedStdDeg = crb * eta;
  const sres = resolutionLimit(s, m, design.snapshots);
  const r = input.targets.resolveDeg;
  return {
    predictedStdDeg,
    statisticalResolutionDeg: sres,
    meetsAccuracy: predictedStdDeg <= input.targets.accuracyDeg,
    meetsResolution: r === undefined || (sres !== null && sres <= r),
  };
}
