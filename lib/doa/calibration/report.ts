/**
 * One calibration from reference recordings: the input checks, the fit (known bearings
 * or self-calibration), and the report — per-element estimate ± std, the fit residual,
 * leave-one-out consistency between references, and a verdict.
 *
 * Residual: gᴴQg / (gᴴg·K), the mean fraction of a calibrated steering vector's energy
 * outside its recording's signal subspace (0 … 1); `residualUncalibrated` is the same
 * for g = 1, so before and after can be compared.
 *
 * Consistency (R ≥ 2 references): for each reference r, the fit of r alone against the
 * joint fit of the others; per element the gain (dB) and phase (°) differences, divided
 * by √(σ_r² + σ_−r²) from the two jackknives, give χ² with 2(M−1) degrees of freedom.
 * A difference is significant above the 0.999 quantile (Wilson–Hilferty approximation,
 * common practice) and matters when it is also larger than 0.2 dB or 2° RMS (a house
 * tolerance, not a published figure). With three or more references, each reference is
 * also compared with every other one alone; when exactly one reference disagrees even with
 * the reference closest to it, it is named as the lone outlier: its own position's
 * multipath (or a wrong bearing) is the likely cause.
 */
import { DoaInputError } from '../errors';
import { requireSpacing } from '../checks';
import { electricalAngle } from '../angles';
import type { ComplexMatrix } from '../linalg/complex';
import type { ElementGainState } from './gains';
import {
  fitSubset,
  normalisedResidual,
  prepareReferences,
  quadraticForm,
  sumForms,
  type CalibrationReference,
  type GainFit,
  type PreparedReference,
} from './known-bearings';
import { SELF_CALIBRATION_ASSUMPTIONS, selfCalibrateSubset } from './self-calibration';

export const CALIBRATION_METHODS = ['known-bearings', 'self-calibration'] as const;
export type CalibrationMethod = (typeof CALIBRATION_METHODS)[number];

export const CALIBRATION_METHOD_LABELS: Record<CalibrationMethod, string> = {
  'known-bearings':
    'Known-bearings subspace fit (Weiss & Friedlander 1990, gain/phase step with the bearings fixed), joint over references',
  'self-calibration':
    'Self-calibration: alternating gain/phase and bearings (Weiss & Friedlander 1990), bearings given as starting values',
};

/** A reference the data cannot support; `reference` and `bearing` are 0-based indices. */
export class CalibrationInputError extends Error {
  constructor(
    message: string,
    readonly reference: number,
    readonly what: 'bearingsDeg' | 'datasetId',
    readonly bearing?: number,
  ) {
    super(message);
    this.name = 'CalibrationInputError';
  }
}

/** Below this share of the signal eigenvalue, the beam at a given bearing holds "no signal" (−10 dB). */
export const SIGNAL_AT_BEARING_FLOOR = 0.1;
/** Tolerances for "matters" (house choice): RMS over elements. */
export const CONSISTENCY_GAIN_DB = 0.2;
export const CONSISTENCY_PHASE_DEG = 2;
/** A calibration whose per-element std exceeds these is "weak" (house choice). */
export const WEAK_GAIN_STD_DB = 0.5;
export const WEAK_PHASE_STD_DEG = 5;
/** A residual above this after calibration is a "poor fit" (house choice, −13 dB). */
export const POOR_FIT_RESIDUAL = 0.05;

/**
 * Refuses a reference that shows no signal at a bearing given: the K-th eigenvalue of R
 * must stand above the noise (twice the Marchenko–Pastur edge σ²(1 + √(M/N))², common
 * practice), and the Bartlett beam aᴴRa/M² minus the noise σ²/M at each bearing must reach
 * SIGNAL_AT_BEARING_FLOOR × (λ_K − σ²)/M. Element errors of a few dB and tens of degrees
 * cost the beam well under 10 dB; a bearing in a sidelobe or in empty sea does not pass.
 */
export function checkReferenceSignals(prepared: readonly PreparedReference[], d: number): void {
  prepared.forEach((p, r) => {
    const m = p.blocks.elements;
    const n = p.blocks.snapshots;
    const k = p.blocks.bearingsDeg.length;
    const ev = p.eigenvalues;
    let noise = 0;
    for (let i = k; i < m; i++) noise += ev[i];
    noise /= m - k;
    const edge = noise * (1 + Math.sqrt(m / n)) ** 2;
    const above = Array.from(ev).filter((v) => v > 2 * edge).length;
    if (above < k) {
      throw new CalibrationInputError(
        `reference ${r + 1} shows ${above} signal(s) above the noise but ${k} bearing(s) were given; there is no signal for ${k - above} of them`,
        r,
        'bearingsDeg',
      );
    }
    const level = (ev[k - 1] - noise) / m;
    p.blocks.bearingsDeg.forEach((bearing, j) => {
      const beam = bartlett(p.covariance, bearing, d) - noise / m;
      if (beam < SIGNAL_AT_BEARING_FLOOR * level) {
        const db = 10 * Math.log10(Math.max(beam, 1e-300) / level);
        throw new CalibrationInputError(
          `reference ${r + 1} has no signal at ${bearing}°: the beam there is ${db.toFixed(1)} dB below the weakest of its ${k} signal(s)`,
          r,
          'bearingsDeg',
          j,
        );
      }
    });
  });
}

function bartlett(r: ComplexMatrix, bearingDeg: number, d: number): number {
  const m = r.rows;
  const mu = electricalAngle(bearingDeg, d);
  let out = 0;
  for (let i = 0; i < m; i++)
    for (let j = 0; j < m; j++) {
      // conj(a_i)·R_ij·a_j
      const ph = mu * (j - i);
      out += r.re[i * m + j] * Math.cos(ph) - r.im[i * m + j] * Math.sin(ph);
    }
  return out / (m * m);
}

export interface ElementEstimate {
  /** 1-based. */
  element: number;
  gainDb: number;
  gainStdDb: number;
  phaseDeg: number;
  phaseStdDeg: number;
}

export interface ReferenceConsistency {
  /** χ² of this reference alone against the joint fit of the others, per degree of freedom. */
  chiSquarePerDof: number;
  degreesOfFreedom: number;
  rmsGainDiffDb: number;
  rmsPhaseDiffDeg: number;
  /** Beyond the 0.999 quantile and larger than the tolerances. */
  disagrees: boolean;
}

export interface ReferenceReport {
  /** 0-based, in request order. */
  index: number;
  bearingsDeg: number[];
  /** Self-calibration: the fitted bearings. */
  fittedBearingsDeg?: number[];
  snapshots: number;
  residual: number;
  residualUncalibrated: number;
  consistency?: ReferenceConsistency;
  /** Three or more references: the comparison with the single reference it agrees with best. */
  closestAgreement?: ReferenceConsistency & { reference: number };
}

export type VerdictStatus = 'supported' | 'weak' | 'poor-fit' | 'inconsistent';

export interface CalibrationVerdict {
  status: VerdictStatus;
  supported: boolean;
  /** 0-based indices of the references that disagree with the others. */
  disagreeing: number[];
  /** The lone outlier, when one reference stands out (three or more references). */
  flaggedReference: number | null;
  messages: string[];
}

export interface CalibrationReport {
  method: CalibrationMethod;
  methodLabel: string;
  assumptions: string[];
  elements: ElementEstimate[];
  residual: number;
  residualUncalibrated: number;
  references: ReferenceReport[];
  jackknifeBlocks: number;
  verdict: CalibrationVerdict;
}

export interface CalibrationResult {
  states: ElementGainState[];
  report: CalibrationReport;
}

export interface CalibrateOptions {
  spacingWavelengths: number;
  method?: CalibrationMethod;
  blocks?: number;
  onProgress?: (fraction: number) => void;
}

/** Inverse upper-tail χ² quantile at p = 0.001 (Wilson–Hilferty). */
export function chiSquare999(dof: number): number {
  const z = 3.090232306167813;
  const a = 2 / (9 * dof);
  return dof * (1 - a + z * Math.sqrt(a)) ** 3;
}

function wrap(deg: number): number {
  let x = deg;
  while (x > 180) x -= 360;
  while (x <= -180) x += 360;
  return x;
}

export function consistencyOf(one: GainFit, rest: GainFit): ReferenceConsistency {
  const m = one.states.length;
  let chi = 0;
  let sg = 0;
  let sp = 0;
  for (let i = 1; i < m; i++) {
    const dg = one.states[i].gainDb - rest.states[i].gainDb;
    const dp = wrap(one.states[i].phaseDeg - rest.states[i].phaseDeg);
    const vg = one.gainStdDb[i] ** 2 + rest.gainStdDb[i] ** 2 + 1e-12;
    const vp = one.phaseStdDeg[i] ** 2 + rest.phaseStdDeg[i] ** 2 + 1e-10;
    chi += (dg * dg) / vg + (dp * dp) / vp;
    sg += dg * dg;
    sp += dp * dp;
  }
  const dof = 2 * (m - 1);
  const rmsG = Math.sqrt(sg / (m - 1));
  const rmsP = Math.sqrt(sp / (m - 1));
  return {
    chiSquarePerDof: chi / dof,
    degreesOfFreedom: dof,
    rmsGainDiffDb: rmsG,
    rmsPhaseDiffDeg: rmsP,
    disagrees: chi > chiSquare999(dof) && (rmsG > CONSISTENCY_GAIN_DB || rmsP > CONSISTENCY_PHASE_DEG),
  };
}

/** Fits, checks and reports. Throws CalibrationInputError / DoaInputError on data that cannot be used. */
export function calibrate(references: readonly CalibrationReference[], options: CalibrateOptions): CalibrationResult {
  const d = options.spacingWavelengths;
  requireSpacing(d);
  const method = options.method ?? 'known-bearings';
  if (!CALIBRATION_METHODS.includes(method)) throw new DoaInputError('bad-value', `unknown method ${method}`);
  const report = options.onProgress ?? (() => {});
  const prepared = prepareReferences(references, {
    spacingWavelengths: d,
    blocks: options.blocks,
    onProgress: (f) => report(0.5 * f),
  });
  checkReferenceSignals(prepared, d);
  const all = prepared.map((_, i) => i);
  const fit = (use: number[]) =>
    method === 'self-calibration'
      ? selfCalibrateSubset(prepared, use, { spacingWavelengths: d })
      : fitSubset(prepared, use);
  const joint = fit(all);
  const fitted = 'bearingsDeg' in joint ? (joint.bearingsDeg as number[][]) : null;
  report(0.6);
  const m = joint.states.length;
  const unit = { re: new Float64Array(m).fill(1), im: new Float64Array(m) };
  const refReports: ReferenceReport[] = prepared.map((p, r) => {
    const bearings = fitted ? fitted[r] : p.blocks.bearingsDeg;
    const q = fitted ? quadraticForm(p.projector, bearings, d) : p.form;
    const k = bearings.length;
    return {
      index: r,
      bearingsDeg: p.blocks.bearingsDeg.slice(),
      ...(fitted ? { fittedBearingsDeg: bearings.slice() } : {}),
      snapshots: p.blocks.snapshots,
      residual: normalisedResidual(q, joint.gains, k),
      residualUncalibrated: normalisedResidual(q, unit, k),
    };
  });
  if (prepared.length >= 2) {
    const singles = prepared.map((_, r) => fit([r]));
    prepared.forEach((_, r) => {
      const rest = fit(all.filter((i) => i !== r));
      refReports[r].consistency = consistencyOf(singles[r], rest);
      if (prepared.length >= 3) {
        let best: (ReferenceConsistency & { reference: number }) | null = null;
        for (const o of all) {
          if (o === r) continue;
          const c = consistencyOf(singles[r], singles[o]);
          if (!best || c.chiSquarePerDof < best.chiSquarePerDof) best = { ...c, reference: o };
        }
        refReports[r].closestAgreement = best!;
      }
      report(0.6 + (0.4 * (r + 1)) / prepared.length);
    });
  }
  report(1);
  const totalSources = refReports.reduce((s, r) => s + r.bearingsDeg.length, 0);
  const qAll = sumForms(prepared.map((p, r) => (fitted ? quadraticForm(p.projector, fitted[r], d) : p.form)));
  const residual = normalisedResidual(qAll, joint.gains, totalSources);
  const residualUncalibrated = normalisedResidual(qAll, unit, totalSources);
  const elements: ElementEstimate[] = joint.states.map((s, i) => ({
    element: i + 1,
    gainDb: s.gainDb,
    gainStdDb: joint.gainStdDb[i],
    phaseDeg: s.phaseDeg,
    phaseStdDeg: joint.phaseStdDeg[i],
  }));
  const verdict = verdictOf(refReports, elements, residual);
  return {
    states: joint.states,
    report: {
      method,
      methodLabel: CALIBRATION_METHOD_LABELS[method],
      assumptions:
        method === 'self-calibration'
          ? SELF_CALIBRATION_ASSUMPTIONS
          : [
              'The sources of each recording are uncorrelated, fewer than the elements, and at the bearings given.',
              'Each element has one complex gain (no mutual coupling, no position error); element 1 is the reference.',
            ],
      elements,
      residual,
      residualUncalibrated,
      references: refReports,
      jackknifeBlocks: Math.min(...prepared.map((p) => p.jackknifeForms.length)),
      verdict,
    },
  };
}

function verdictOf(refs: ReferenceReport[], elements: ElementEstimate[], residual: number): CalibrationVerdict {
  const messages: string[] = [];
  const disagreeing = refs.filter((r) => r.consistency?.disagrees).map((r) => r.index);
  let flaggedReference: number | null = null;
  if (refs.length >= 3) {
    const standOut = refs.filter((r) => r.closestAgreement?.disagrees).map((r) => r.index);
    if (standOut.length === 1) flaggedReference = standOut[0];
  }
  const maxG = Math.max(...elements.map((e) => e.gainStdDb));
  const maxP = Math.max(...elements.map((e) => e.phaseStdDeg));
  let status: VerdictStatus = 'supported';
  if (flaggedReference !== null) {
    status = 'inconsistent';
    const c = refs[flaggedReference].consistency!;
    messages.push(
      `Reference ${flaggedReference + 1} disagrees with the others (χ²/dof ${c.chiSquarePerDof.toFixed(1)}, RMS ${c.rmsGainDiffDb.toFixed(2)} dB, ${c.rmsPhaseDiffDeg.toFixed(1)}°) while they agree among themselves: multipath at its position or a wrong bearing is likely; fit again without it.`,
    );
  } else if (disagreeing.length) {
    status = 'inconsistent';
    messages.push(
      `References ${disagreeing.map((i) => i + 1).join(', ')} disagree with the others beyond their noise; the joint fit averages position-dependent errors (multipath), but check the bearings given.`,
    );
  }
  if (residual > POOR_FIT_RESIDUAL) {
    if (status === 'supported') status = 'poor-fit';
    messages.push(
      `After calibration ${(100 * residual).toFixed(1)} % of the steering vectors' energy stays outside the signal subspace (limit ${100 * POOR_FIT_RESIDUAL} %): per-element gains and phases do not explain these recordings (multipath, coupling or wrong bearings).`,
    );
  }
  if (maxG > WEAK_GAIN_STD_DB || maxP > WEAK_PHASE_STD_DEG) {
    if (status === 'supported') status = 'weak';
    messages.push(
      `The estimates are uncertain (largest std ${maxG.toFixed(2)} dB, ${maxP.toFixed(1)}°; limits ${WEAK_GAIN_STD_DB} dB, ${WEAK_PHASE_STD_DEG}°): record longer or at higher SNR.`,
    );
  }
  if (refs.length === 1)
    messages.push(
      'One reference: the multipath of its position cannot be told apart from the array’s own errors; a second or third reference at other bearings checks it.',
    );
  if (status === 'supported')
    messages.unshift(
      refs.length > 1
        ? 'The references agree and the fit explains them: the data support this calibration.'
        : 'The fit explains the reference: the data support this calibration.',
    );
  return { status, supported: status === 'supported', disagreeing, flaggedReference, messages };
}
