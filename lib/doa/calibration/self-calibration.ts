/**
 * Self-calibration: gains, phases and bearings together, when the bearings are known
 * only roughly. Alternating minimisation of Σ_r Σ_k ‖P_n,r · diag(a(θ_rk)) · g‖²
 * after Weiss & Friedlander, "Eigenstructure methods for direction finding with
 * sensor gain and phase uncertainties", Circuits, Systems and Signal Processing 9(3),
 * 1990, pp. 271–300:
 *   1. with g fixed, each bearing is the minimum of the calibrated MUSIC cost
 *      (g⊙a(θ))ᴴ·P_n·(g⊙a(θ)) searched within ±searchDeg of its current value;
 *   2. with the bearings fixed, g is the known-bearings step (known-bearings.ts);
 * until the bearings move by less than 1e−4° (at most 30 rounds).
 *
 * Assumptions (shown with the result):
 * - the sources of each recording are uncorrelated and fewer than the elements;
 * - the given bearings are starting values within about `searchDeg` of the truth,
 *   and the errors are small enough that the uncalibrated MUSIC minima lie near them;
 * - a phase ramp linear in the element index cannot be told from a common shift of
 *   every bearing (both move sin θ alike), so the fitted phases are made to have no
 *   linear trend (least-squares slope over the elements 0); bearings are relative to that.
 */
import { DoaInputError } from '../errors';
import { electricalAngle } from '../angles';
import type { ComplexMatrix } from '../linalg/complex';
import type { ElementGains, ElementGainState } from './gains';
import {
  minimiseWithUnitFirst,
  quadraticForm,
  statesOf,
  sumForms,
  type GainFit,
  type PreparedReference,
} from './known-bearings';

export interface SelfCalibrationOptions {
  spacingWavelengths: number;
  /** Search half-width around each bearing, degrees (default 10). */
  searchDeg?: number;
  maxRounds?: number;
}

/** Calibrated MUSIC cost of one bearing: (g⊙a)ᴴ P_n (g⊙a). */
function musicCost(pn: ComplexMatrix, g: ElementGains, bearingDeg: number, d: number): number {
  const m = pn.rows;
  const mu = electricalAngle(bearingDeg, d);
  const vr = new Float64Array(m);
  const vi = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    const c = Math.cos(mu * i);
    const s = Math.sin(mu * i);
    vr[i] = g.re[i] * c - g.im[i] * s;
    vi[i] = g.re[i] * s + g.im[i] * c;
  }
  let out = 0;
  for (let i = 0; i < m; i++) {
    let tr = 0;
    let ti = 0;
    for (let j = 0; j < m; j++) {
      tr += pn.re[i * m + j] * vr[j] - pn.im[i * m + j] * vi[j];
      ti += pn.re[i * m + j] * vi[j] + pn.im[i * m + j] * vr[j];
    }
    out += vr[i] * tr + vi[i] * ti;
  }
  return out;
}

/** The minimum of the cost within [lo, hi]: a 0.05° scan, then golden-section refinement to 1e−6°. */
function minimiseBearing(f: (b: number) => number, lo: number, hi: number): number {
  const step = 0.05;
  let best = lo;
  let bestValue = Infinity;
  for (let b = lo; b <= hi + 1e-12; b += step) {
    const v = f(b);
    if (v < bestValue) {
      bestValue = v;
      best = b;
    }
  }
  let a = Math.max(lo, best - step);
  let c = Math.min(hi, best + step);
  const r = (Math.sqrt(5) - 1) / 2;
  let x1 = c - r * (c - a);
  let x2 = a + r * (c - a);
  let f1 = f(x1);
  let f2 = f(x2);
  while (c - a > 1e-6) {
    if (f1 < f2) {
      c = x2;
      x2 = x1;
      f2 = f1;
      x1 = c - r * (c - a);
      f1 = f(x1);
    } else {
      a = x1;
      x1 = x2;
      f1 = f2;
      x2 = a + r * (c - a);
      f2 = f(x2);
    }
  }
  return (a + c) / 2;
}

/** Removes the least-squares linear phase trend over the element index, keeping element 1 at 0°. */
function removePhaseTrend(g: ElementGains): ElementGains {
  const states = statesOf(g);
  const m = states.length;
  const xm = (m - 1) / 2;
  const ym = states.reduce((s, st) => s + st.phaseDeg, 0) / m;
  let sxy = 0;
  let sxx = 0;
  states.forEach((st, i) => {
    sxy += (i - xm) * (st.phaseDeg - ym);
    sxx += (i - xm) ** 2;
  });
  const slope = sxx > 0 ? sxy / sxx : 0;
  const re = new Float64Array(m);
  const im = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    const ph = (-slope * i * Math.PI) / 180;
    const c = Math.cos(ph);
    const s = Math.sin(ph);
    re[i] = g.re[i] * c - g.im[i] * s;
    im[i] = g.re[i] * s + g.im[i] * c;
  }
  return { re, im };
}

/** One alternating fit on given projectors; returns gains and the bearings per reference. */
export function alternatingFit(
  projectors: readonly ComplexMatrix[],
  startBearings: readonly (readonly number[])[],
  options: SelfCalibrationOptions,
): { gains: ElementGains; bearingsDeg: number[][]; rounds: number } {
  const d = options.spacingWavelengths;
  const search = options.searchDeg ?? 10;
  const maxRounds = options.maxRounds ?? 30;
  const m = projectors[0].rows;
  let g: ElementGains = { re: new Float64Array(m).fill(1), im: new Float64Array(m) };
  let bearings = startBearings.map((b) => b.slice());
  let rounds = 0;
  for (; rounds < maxRounds; rounds++) {
    const next = bearings.map((list, r) =>
      list.map((_, k) =>
        minimiseBearing(
          (b) => musicCost(projectors[r], g, b, d),
          Math.max(-90, startBearings[r][k] - search),
          Math.min(90, startBearings[r][k] + search),
        ),
      ),
    );
    g = removePhaseTrend(minimiseWithUnitFirst(sumForms(projectors.map((pn, r) => quadraticForm(pn, next[r], d)))));
    const moved = Math.max(...next.flatMap((list, r) => list.map((b, k) => Math.abs(b - bearings[r][k]))));
    bearings = next;
    if (moved < 1e-4) break;
  }
  return { gains: g, bearingsDeg: bearings.map((l) => l.slice().sort((a, b) => a - b)), rounds: rounds + 1 };
}

export interface SelfCalibrationFit extends GainFit {
  bearingsDeg: number[][];
  rounds: number;
}

/** Self-calibration of the references named by `use`, with jackknife standard deviations. */
export function selfCalibrateSubset(
  prepared: readonly PreparedReference[],
  use: readonly number[],
  options: SelfCalibrationOptions,
): SelfCalibrationFit {
  if (use.length === 0) throw new DoaInputError('bad-size', 'no reference to fit');
  const starts = use.map((i) => prepared[i].blocks.bearingsDeg);
  const full = alternatingFit(
    use.map((i) => prepared[i].projector),
    starts,
    options,
  );
  const states = statesOf(full.gains);
  const blocks = Math.min(...use.map((i) => prepared[i].jackknifeProjectors.length));
  const replicates: ElementGainState[][] = [];
  for (let b = 0; b < blocks; b++) {
    const rep = alternatingFit(
      use.map((i) => prepared[i].jackknifeProjectors[b]),
      full.bearingsDeg,
      { ...options, maxRounds: 10 },
    );
    replicates.push(statesOf(rep.gains, states));
  }
  const m = states.length;
  const gainStdDb = new Array<number>(m).fill(0);
  const phaseStdDeg = new Array<number>(m).fill(0);
  if (blocks >= 2) {
    for (let i = 1; i < m; i++) {
      const mg = replicates.reduce((s, r) => s + r[i].gainDb, 0) / blocks;
      const mp = replicates.reduce((s, r) => s + r[i].phaseDeg, 0) / blocks;
      const vg = replicates.reduce((s, r) => s + (r[i].gainDb - mg) ** 2, 0);
      const vp = replicates.reduce((s, r) => s + (r[i].phaseDeg - mp) ** 2, 0);
      gainStdDb[i] = Math.sqrt(((blocks - 1) / blocks) * vg);
      phaseStdDeg[i] = Math.sqrt(((blocks - 1) / blocks) * vp);
    }
  }
  return {
    gains: full.gains,
    states,
    gainStdDb,
    phaseStdDeg,
    replicates,
    bearingsDeg: full.bearingsDeg,
    rounds: full.rounds,
  };
}

export const SELF_CALIBRATION_ASSUMPTIONS = [
  'The sources of each recording are uncorrelated and fewer than the elements.',
  'The bearings given are starting values within about ±10° of the truth, and the element errors are small enough that the uncalibrated array still points near them.',
  'A phase ramp along the line cannot be told from a common shift of every bearing, so the fitted phases have no linear trend; the bearings are relative to that choice.',
];
