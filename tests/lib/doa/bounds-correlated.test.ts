// Stochastic CRB with a full source covariance P (Stoica & Nehorai 1990, the unconditional CRB
// σ²/(2N)·{Re[(Dᴴ·P_A⊥·D) ⊙ (P·Aᴴ·R⁻¹·A·P)ᵀ]}⁻¹ with full P) and the run-uncertainty choice.
// References: fixtures/doa/generate.py `crbFullSourceCovariance` (numpy, M × M matrices; the
// generator also checks each case against the Slepian–Bangs Fisher information, rtol 1e−8) and
// docs/references.md §5 (two uncorrelated equal sources, M = 10, N = 100, 0 dB: 0.20656°, 0.20975°).
import { describe, expect, it } from 'vitest';
import fixtures from '@/fixtures/doa/methods.json';
import { stochasticCrb, stochasticCrbFullCovariance } from '@/lib/doa/bounds/crb';
import {
  CORRELATED_SOURCES_THRESHOLD,
  fitSourceCovariance,
  uncertaintyFromCovariance,
} from '@/lib/doa/bounds/uncertainty';
import { simulateSnapshots } from '@/lib/doa/sim/simulate';
import { forwardBackward, sampleCovariance, spatialSmoothing } from '@/lib/doa/covariance';
import { DoaInputError } from '@/lib/doa/errors';
import type { ComplexMatrix } from '@/lib/doa/linalg/complex';
import { matrixFromJson, JsonMatrix } from './helpers';

interface FullCase {
  name: string;
  elements: number;
  spacingWavelengths: number;
  bearingsDeg: number[];
  sourceCovariance: JsonMatrix;
  noisePower: number;
  snapshots: number;
  covarianceRad2: number[];
  stdDeg: number[];
}
const cases = (fixtures as unknown as { crbFullSourceCovariance: FullCase[] }).crbFullSourceCovariance;

const relErr = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('stochasticCrbFullCovariance against numpy (fixtures/doa/generate.py)', () => {
  it('has the fixture cases', () => expect(cases.length).toBeGreaterThanOrEqual(5));
  for (const c of cases) {
    it(`${c.name}: every entry of the K × K bound within 1e−9 relative of the largest`, () => {
      const got = stochasticCrbFullCovariance({ ...c, sourceCovariance: matrixFromJson(c.sourceCovariance) });
      const scale = Math.max(...c.covarianceRad2.map(Math.abs));
      c.covarianceRad2.forEach((v, i) => expect(Math.abs(got.covarianceRad2[i] - v) / scale).toBeLessThan(1e-9));
      c.stdDeg.forEach((v, i) => expect(relErr(got.stdDeg[i], v)).toBeLessThan(1e-9));
    });
  }

  it('uncorrelated fixture case equals docs/references.md §5 (0.20656°, 0.20975°)', () => {
    const c = cases.find((x) => x.name === 'uncorrelated-m10')!;
    const got = stochasticCrbFullCovariance({ ...c, sourceCovariance: matrixFromJson(c.sourceCovariance) });
    expect(got.stdDeg[0]).toBeCloseTo(0.20656, 5);
    expect(got.stdDeg[1]).toBeCloseTo(0.20975, 5);
  });

  it('coherent pair in quadrature: the full-P σ is about twice the uncorrelated one (numpy case)', () => {
    // Why the full-P bound matters: with diag(P) the same pair gets half the σ (numpy: ratio 2.02).
    const c = cases.find((x) => x.name === 'coherent-quadrature-m10')!;
    const p = matrixFromJson(c.sourceCovariance);
    const diag = stochasticCrb({ ...c, sourcePowers: [p.re[0], p.re[3]] });
    c.stdDeg.forEach((v, i) => expect(v / diag.stdDeg[i]).toBeGreaterThan(1.9));
  });
});

describe('stochasticCrbFullCovariance: consistency and input checks', () => {
  it('with a diagonal P equals stochasticCrb to 1e−12 relative (consistency check)', () => {
    const base = { elements: 12, spacingWavelengths: 0.5, bearingsDeg: [-20, 3, 31], noisePower: 0.3, snapshots: 80 };
    const powers = [1, 2.5, 0.4];
    const p: ComplexMatrix = { rows: 3, cols: 3, re: new Float64Array(9), im: new Float64Array(9) };
    powers.forEach((v, i) => (p.re[i * 4] = v));
    const full = stochasticCrbFullCovariance({ ...base, sourceCovariance: p });
    const diag = stochasticCrb({ ...base, sourcePowers: powers });
    diag.covarianceRad2.forEach((v, i) =>
      expect(Math.abs(full.covarianceRad2[i] - v)).toBeLessThan(1e-12 * Math.abs(diag.covarianceRad2[0])),
    );
  });

  const base = { elements: 8, spacingWavelengths: 0.5, bearingsDeg: [0, 15], noisePower: 1, snapshots: 50 };
  const mat = (re: number[], im: number[] = [0, 0, 0, 0]): ComplexMatrix => ({
    rows: 2,
    cols: 2,
    re: Float64Array.from(re),
    im: Float64Array.from(im),
  });
  it('names a wrong size', () => {
    expect(() =>
      stochasticCrbFullCovariance({
        ...base,
        sourceCovariance: { rows: 1, cols: 1, re: Float64Array.of(1), im: Float64Array.of(0) },
      }),
    ).toThrow(/sourceCovariance is 1 × 1; expected 2 × 2/);
  });
  it('names a non-Hermitian entry', () => {
    expect(() => stochasticCrbFullCovariance({ ...base, sourceCovariance: mat([1, 0.5, 0.2, 1]) })).toThrow(
      /not Hermitian at \[0\]\[1\]/,
    );
  });
  it('names a covariance that is not positive semi-definite', () => {
    expect(() => stochasticCrbFullCovariance({ ...base, sourceCovariance: mat([1, 2, 2, 1]) })).toThrow(DoaInputError);
    expect(() => stochasticCrbFullCovariance({ ...base, sourceCovariance: mat([1, 2, 2, 1]) })).toThrow(
      /not positive semi-definite/,
    );
  });
  it('names a zero power', () => {
    expect(() => stochasticCrbFullCovariance({ ...base, sourceCovariance: mat([0, 0, 0, 1]) })).toThrow(
      /sourceCovariance\[0\]\[0\]/,
    );
  });
});

describe('uncertaintyFromCovariance: which bound a run reports', () => {
  const m = 10;
  const d = 0.5;
  const truth = [-4, 6];
  const sim = (correlation: number, seed: number) =>
    simulateSnapshots({
      elements: m,
      spacingWavelengths: d,
      bearingsDeg: truth,
      powers: [10, 10],
      noisePower: 1,
      snapshots: 400,
      seed,
      correlation,
    });

  it(`coherent pair (ρ = 1): full-covariance bound, largest fitted |ρ| above ${CORRELATED_SOURCES_THRESHOLD}`, () => {
    const r = sampleCovariance(sim(1, 11));
    const u = uncertaintyFromCovariance({
      elements: m,
      spacingWavelengths: d,
      snapshots: 400,
      bearingsDeg: truth,
      usedCovariance: r,
    });
    expect(u.bound).toBe('stochastic-full-covariance');
    expect(u.maxSourceCorrelation!).toBeGreaterThan(0.95);
    expect(u.basis).toMatch(/full source covariance/);
    // consistency: the reported σ is stochasticCrbFullCovariance at the P it reports
    const again = stochasticCrbFullCovariance({
      elements: m,
      spacingWavelengths: d,
      bearingsDeg: truth,
      sourceCovariance: u.sourceCovariance!,
      noisePower: u.noisePower,
      snapshots: 400,
    });
    expect(Array.from(u.crb.stdDeg)).toEqual(Array.from(again.stdDeg));
  });

  it('uncorrelated pair: the uncorrelated bound, equal to stochasticCrb at the fitted powers', () => {
    const r = sampleCovariance(sim(0, 12));
    const u = uncertaintyFromCovariance({
      elements: m,
      spacingWavelengths: d,
      snapshots: 400,
      bearingsDeg: truth,
      usedCovariance: r,
    });
    expect(u.bound).toBe('stochastic-uncorrelated');
    expect(u.maxSourceCorrelation!).toBeLessThan(CORRELATED_SOURCES_THRESHOLD);
    expect(Array.from(u.crb.stdDeg)).toEqual(Array.from(stochasticCrb(u.boundsInput).stdDeg));
  });

  it('smoothing + forward–backward on a coherent pair: judged on the unprocessed covariance, stated in the basis', () => {
    const x = sim(1, 13);
    const raw = sampleCovariance(x);
    const used = forwardBackward(spatialSmoothing(raw, 7));
    const withRaw = uncertaintyFromCovariance({
      elements: m,
      spacingWavelengths: d,
      snapshots: 400,
      bearingsDeg: truth,
      usedCovariance: used,
      sampleCovariance: raw,
      processing: { smoothingSubarray: 7, forwardBackward: true },
    });
    expect(withRaw.bound).toBe('stochastic-full-covariance');
    expect(withRaw.basis).toMatch(/spatial smoothing \(L = 7\) and forward–backward averaging/);
    expect(withRaw.basis).toMatch(/unprocessed data/);
    // The smoothed covariance alone hides the coherence (smoothing decorrelates): consistency check
    // that judging on it would have chosen differently.
    const fitUsed = fitSourceCovariance(used, truth, d);
    expect(fitUsed.maxCorrelation).toBeLessThan(withRaw.maxSourceCorrelation!);
    const without = uncertaintyFromCovariance({
      elements: m,
      spacingWavelengths: d,
      snapshots: 400,
      bearingsDeg: truth,
      usedCovariance: used,
      processing: { smoothingSubarray: 7, forwardBackward: true },
    });
    expect(without.bound).toBe('stochastic-uncorrelated');
    expect(without.maxSourceCorrelation).toBeNull();
    expect(without.basis).toMatch(/correlation not judged/);
  });

  it('single-snapshot arrangement: uncorrelated bound, and the basis says why', () => {
    const x = simulateSnapshots({
      elements: 16,
      spacingWavelengths: d,
      bearingsDeg: [-10, 20],
      noisePower: 0.01,
      snapshots: 1,
      seed: 3,
    });
    const used = spatialSmoothing(sampleCovariance(x), 9);
    const u = uncertaintyFromCovariance({
      elements: 16,
      spacingWavelengths: d,
      snapshots: 1,
      bearingsDeg: [-10, 20],
      usedCovariance: used,
      processing: { singleSnapshot: true },
    });
    expect(u.bound).toBe('stochastic-uncorrelated');
    expect(u.basis).toMatch(/one snapshot cannot show source correlation/);
  });
});
