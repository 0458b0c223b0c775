// Aperture planner (lib/planner) against an independent numpy reference and the engine's own
// Monte Carlo.
//  - fixtures/planner/planner.json is written by fixtures/planner/generate.py (numpy): the
//    stochastic CRB in its full matrix form (Stoica & Nehorai 1990) and the first-order LS-ESPRIT
//    variance from a finite-difference Jacobian of the real algorithm, then the planner's search
//    redone from scratch. Tolerance: 1e-6 relative (the finite differences use ε = 1e-6).
//  - Minimality and the grating-lobe condition are consistency checks of the search against
//    lib/doa evaluated directly, and against the definition of a grating lobe
//    (docs/conventions.md §5: a full-height lobe at u0 + k/d, k ≠ 0, inside |u| ≤ 1).
//  - Monte Carlo: the engine's seeded study (lib/studies/monte-carlo.ts) of the recommended
//    candidate; the RMSE's 95 % interval uses the normal approximation of the mean square of
//    Gaussian errors, RMSE·(1 ± 1.96/√(2T)) (common practice).
import { describe, expect, it } from 'vitest';
import fixture from '@/fixtures/planner/planner.json';
import {
  efficiencyFactor,
  espritLsVarianceMu,
  evaluateDesign,
  planAperture,
  PlanInfeasibleError,
  stochasticCrbMu,
  type PlanInput,
  type PlannerMethod,
} from '@/lib/planner';
import { gratingLobeFreeScanDeg } from '@/lib/doa';
import { runStudy } from '@/lib/studies/monte-carlo';

type Case = (typeof fixture.cases)[number];

function inputOf(c: Case): PlanInput {
  return {
    band: c.band,
    propagationSpeedMps: c.propagationSpeedMps,
    scanSectorDeg: c.scanSectorDeg,
    targets: c.targets,
    snrDbPerElement: c.snrDbPerElement,
    snapshotBudget: c.snapshotBudget,
    snapshotField: 'snapshots',
    method: c.method as PlannerMethod,
    smoothing: c.smoothing as 'none' | 'auto',
    forwardBackward: false,
    constraints: c.constraints,
  };
}

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('first-order ESPRIT variance', () => {
  it.each(fixture.efficiency)(
    'matches the numpy finite-difference Jacobian (M=$elements, L=$subarray, fb=$forwardBackward)',
    (e) => {
      const v = espritLsVarianceMu(e.elements, e.subarray, e.mu, e.snr, e.forwardBackward);
      expect(rel(v, e.varianceMu)).toBeLessThan(1e-6);
    },
  );

  it('without smoothing equals (1 + 1/(M·SNR))/(SNR·(M−1)²) (consistency check of the closed form)', () => {
    for (const m of [2, 5, 16, 64]) {
      for (const snr of [0.1, 1, 30]) {
        const v = espritLsVarianceMu(m, m, 0.9, snr, false);
        expect(rel(v, (1 + 1 / (m * snr)) / (snr * (m - 1) ** 2))).toBeLessThan(1e-12);
        // ratio to the closed-form CRB (docs/references.md §5): M(M+1)/(6(M−1))
        expect(rel(v / stochasticCrbMu(m, snr), (m * (m + 1)) / (6 * (m - 1)))).toBeLessThan(1e-12);
      }
    }
  });
});

describe.each(fixture.cases)('plan: $name', (c) => {
  const input = inputOf(c);
  const plan = planAperture(input);
  const rec = plan.candidates[plan.recommendedIndex];

  it('the recommended candidate and the start of the front match the numpy planner', () => {
    expect(rec.spacingM).toBe(c.expected.spacingM);
    expect(rel(rec.spacingWavelengthsAtEvaluation, c.expected.spacingWavelengthsAtEvaluation)).toBeLessThan(1e-12);
    c.expected.front.forEach((e, i) => {
      const got = plan.candidates[i];
      expect(got.elements).toBe(e.elements);
      expect(got.snapshots).toBe(e.snapshots);
      expect(rel(got.crbStdDeg, e.crbStdDeg)).toBeLessThan(1e-6);
      expect(rel(got.efficiencyFactor, e.efficiencyFactor)).toBeLessThan(1e-6);
      expect(rel(got.predictedStdDeg, e.predictedStdDeg)).toBeLessThan(1e-6);
    });
  });

  it('every candidate is minimal: one element fewer, or one snapshot fewer, misses a target', () => {
    for (const cand of plan.candidates) {
      const at = (elements: number, snapshots: number) =>
        evaluateDesign(input, {
          elements,
          snapshots,
          spacingWavelengthsAtEvaluation: cand.spacingWavelengthsAtEvaluation,
        });
      const here = at(cand.elements, cand.snapshots);
      expect(here.meetsAccuracy && here.meetsResolution).toBe(true);
      expect(rel(here.predictedStdDeg, cand.predictedStdDeg)).toBeLessThan(1e-9);
      const minElements = c.targets.resolveDeg !== undefined ? 3 : 2;
      if (cand.elements > minElements) {
        const fewer = at(cand.elements - 1, cand.snapshots);
        expect(fewer.meetsAccuracy && fewer.meetsResolution).toBe(false);
      }
      if (cand.snapshotsSetBy !== 'rank') {
        const shorter = at(cand.elements, cand.snapshots - 1);
        expect(shorter.meetsAccuracy && shorter.meetsResolution).toBe(false);
      } else expect(cand.snapshots).toBe(cand.elements);
    }
  });

  it('no grating lobe anywhere in the sector at the highest frequency', () => {
    const d = rec.spacingWavelengths;
    expect(rel(d, (rec.spacingM * c.band.highHz) / c.propagationSpeedMps)).toBeLessThan(1e-12);
    expect(gratingLobeFreeScanDeg(d)).toBeGreaterThanOrEqual(c.scanSectorDeg);
    for (let i = 0; i <= 2000; i++) {
      const steer = -c.scanSectorDeg + (2 * c.scanSectorDeg * i) / 2000;
      const u0 = Math.sin((steer * Math.PI) / 180);
      for (const k of [-3, -2, -1, 1, 2, 3]) expect(Math.abs(u0 + k / d)).toBeGreaterThan(1);
    }
  });
});

describe('Monte Carlo of the recommended candidate (engine study, seeded)', () => {
  const TRIALS = 400;
  it.each(fixture.cases)('$name: meets the target within the 95 % interval', async (c) => {
    const input = inputOf(c);
    const rec = planAperture(input).candidates[0];
    const study = await runStudy({
      elements: rec.elements,
      spacingWavelengths: rec.spacingWavelengthsAtEvaluation,
      bearingsDeg: [c.targets.atBearingDeg],
      powersDb: [c.snrDbPerElement],
      snapshots: rec.snapshots,
      sweep: { variable: 'snr', values: [c.snrDbPerElement] },
      methods: [input.method],
      trials: TRIALS,
      seed: 15,
      smoothing: input.smoothing,
    });
    const rmse = study.points[0].methods[0].rmseDeg;
    const half = 1.96 / Math.sqrt(2 * TRIALS);
    console.info(
      c.name,
      'predicted',
      rec.predictedStdDeg.toFixed(4),
      'simulated',
      rmse.toFixed(4),
      'target',
      c.targets.accuracyDeg,
    );
    expect(study.points[0].methods[0].outlierRate).toBe(0);
    // the target lies above the lower end of the interval
    expect(rmse * (1 - half)).toBeLessThanOrEqual(c.targets.accuracyDeg);
    // and the prediction lies inside it
    expect(rec.predictedStdDeg).toBeGreaterThanOrEqual(rmse * (1 - half));
    expect(rec.predictedStdDeg).toBeLessThanOrEqual(rmse * (1 + half));
  });
});

describe('infeasible targets', () => {
  const base = inputOf(fixture.cases[0]);
  it('names the element limit and the snapshot budget with how far they are off', () => {
    try {
      planAperture({
        ...base,
        targets: { accuracyDeg: 0.02, atBearingDeg: 10 },
        snapshotBudget: 200,
        constraints: { maxElements: 16 },
      });
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(PlanInfeasibleError);
      const err = e as PlanInfeasibleError;
      expect(err.field).toBe('constraints.maxElements');
      expect(Object.keys(err.fields).sort()).toEqual(['constraints.maxElements', 'snapshots']);
      expect(err.message).toMatch(/needs at least \d+ elements/);
      expect(err.message).toMatch(/× the budget/);
    }
  });
  it('names a fixed spacing that has grating lobes in the sector', () => {
    expect(() => planAperture({ ...base, constraints: { spacingM: 0.4 } })).toThrow(
      /constraints.spacingM .* grating lobes/,
    );
  });
  it('names an aperture too short for the targets', () => {
    try {
      planAperture({ ...base, constraints: { maxApertureM: 0.1 } });
      expect.unreachable();
    } catch (e) {
      expect((e as PlanInfeasibleError).field).toBe('constraints.maxApertureM');
    }
  });
  it('names a smallest spacing above the grating-lobe limit', () => {
    try {
      planAperture({ ...base, constraints: { minSpacingM: 0.5 } });
      expect.unreachable();
    } catch (e) {
      expect((e as PlanInfeasibleError).field).toBe('constraints.minSpacingM');
      expect((e as Error).message).toMatch(/exceeds the largest grating-lobe-free spacing .* by [\d.]+ mm/);
    }
  });
  it('keeps every candidate within the longest aperture', () => {
    const plan = planAperture({ ...base, constraints: { maxApertureM: 1.5 } });
    for (const c of plan.candidates) expect(c.apertureM).toBeLessThanOrEqual(1.5);
    expect(plan.elementLimit).toBe(Math.floor(1.5 / plan.candidates[0].spacingM) + 1);
  });
  it('names a bearing outside the sector', () => {
    expect(() => planAperture({ ...base, targets: { accuracyDeg: 1, atBearingDeg: 50 } })).toThrow(
      /targets.atBearingDeg/,
    );
  });
});

describe('efficiency of the other ESPRIT forms at a larger array (engine Monte Carlo)', () => {
  // M = 16 without smoothing, where the maximal-overlap loss is large (σ/√CRB = 1.74): TLS-ESPRIT
  // is planned with the LS value and Unitary ESPRIT with the forward–backward LS value.
  const TRIALS = 300;
  it.each(['esprit-ls', 'esprit-tls', 'esprit-unitary'] as const)(
    '%s: simulated RMSE within the 95-percent interval of the prediction',
    async (method) => {
      const study = await runStudy({
        elements: 16,
        spacingWavelengths: 0.5,
        bearingsDeg: [15],
        powersDb: [0],
        snapshots: 200,
        sweep: { variable: 'snr', values: [0] },
        methods: [method],
        trials: TRIALS,
        seed: 16,
        smoothing: 'none',
      });
      const point = study.points[0];
      const eta = efficiencyFactor({
        method,
        elements: 16,
        spacingWavelengths: 0.5,
        bearingDeg: 15,
        snr: 1,
        smoothingSubarray: null,
      });
      const predicted = point.crbStdDeg[0] * eta;
      const rmse = point.methods[0].rmseDeg;
      const half = 1.96 / Math.sqrt(2 * TRIALS);
      console.info(method, 'η', eta.toFixed(3), 'predicted', predicted.toFixed(4), 'simulated', rmse.toFixed(4));
      expect(predicted).toBeGreaterThanOrEqual(rmse * (1 - half));
      expect(predicted).toBeLessThanOrEqual(rmse * (1 + half));
    },
  );
});
