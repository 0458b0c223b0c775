// estimateBearings: options, warnings with stable codes, bad input; simulation and metrics.
import { describe, expect, it } from 'vitest';
import { clone, fromNested, zeros } from '@/lib/doa/linalg/complex';
import { estimateBearings } from '@/lib/doa/estimate';
import { DoaInputError } from '@/lib/doa/errors';
import { simulateSnapshots, SeededRandom } from '@/lib/doa/sim/simulate';
import { matchingDistance, pairedRmse } from '@/lib/doa/design/metrics';
import { sampleCovariance } from '@/lib/doa/covariance';

const codes = (r: { warnings: { code: string }[] }) => r.warnings.map((w) => w.code);

describe('estimateBearings', () => {
  const x = simulateSnapshots({
    elements: 8,
    spacingWavelengths: 0.5,
    bearingsDeg: [-20, 15],
    noisePower: 0.1,
    snapshots: 200,
    seed: 2,
  });

  it('finds two well-separated sources with MDL by default, ascending, with full result fields', () => {
    const before = clone(x);
    const r = estimateBearings({ snapshots: x, spacingWavelengths: 0.5, method: 'esprit-ls' });
    expect(x).toEqual(before);
    expect(r.sourceCountRule).toBe('mdl');
    expect(r.sourceCount).toBe(2);
    expect(r.effectiveElements).toBe(8);
    expect(r.eigenvalues.length).toBe(8);
    expect(r.criteria.mdl.length).toBe(8);
    expect(Math.abs(r.bearingsDeg[0] + 20)).toBeLessThan(0.5);
    expect(Math.abs(r.bearingsDeg[1] - 15)).toBeLessThan(0.5);
    expect(r.warnings).toEqual([]);
    expect(r.spectrum).toBeUndefined();
  });

  it('returns a spectrum on the default grid (MUSIC spectrum for ESPRIT) and on a user grid', () => {
    const r = estimateBearings({ snapshots: x, spacingWavelengths: 0.5, method: 'esprit-tls', includeSpectrum: true });
    expect(r.spectrum!.kind).toBe('music');
    expect(r.spectrum!.valuesDb.length).toBe(18001);
    expect(r.spectrum!.startDeg).toBe(-90);
    const g = estimateBearings({
      snapshots: x,
      spacingWavelengths: 0.5,
      method: 'music',
      includeSpectrum: true,
      grid: { startDeg: -60, stepDeg: 0.5, count: 241 },
    });
    expect(g.spectrum!.valuesDb.length).toBe(241);
    expect(g.bearingsDeg.every((b) => Number.isInteger(b * 2))).toBe(true);
  });

  it('warns esprit-efficiency on 12+ elements without smoothing and names ⌈2M/3⌉', () => {
    const y = simulateSnapshots({
      elements: 16,
      spacingWavelengths: 0.5,
      bearingsDeg: [5],
      noisePower: 1,
      snapshots: 100,
      seed: 4,
    });
    const r = estimateBearings({ snapshots: y, spacingWavelengths: 0.5, method: 'esprit-ls', sourceCount: 1 });
    const w = r.warnings.find((v) => v.code === 'esprit-efficiency');
    expect(w?.message).toMatch(/about 2M\/3 = 11/);
    expect(
      codes(
        estimateBearings({
          snapshots: y,
          spacingWavelengths: 0.5,
          method: 'esprit-ls',
          sourceCount: 1,
          smoothingSubarray: 11,
        }),
      ),
    ).not.toContain('esprit-efficiency');
    expect(
      codes(estimateBearings({ snapshots: y, spacingWavelengths: 0.5, method: 'root-music', sourceCount: 1 })),
    ).not.toContain('esprit-efficiency');
  });

  it('flags coherent sources, and smoothing then resolves them (Shan, Wax & Kailath 1985)', () => {
    const c = simulateSnapshots({
      elements: 10,
      spacingWavelengths: 0.5,
      bearingsDeg: [-12, 15],
      noisePower: 0.05,
      snapshots: 100,
      correlation: 1,
      seed: 8,
    });
    const raw = estimateBearings({ snapshots: c, spacingWavelengths: 0.5, method: 'esprit-ls' });
    expect(codes(raw)).toContain('coherent-sources-suspected');
    expect(raw.sourceCount).toBe(1); // the rank deficit: MDL sees one source
    const fixed = estimateBearings({
      snapshots: c,
      spacingWavelengths: 0.5,
      method: 'esprit-ls',
      smoothingSubarray: 7,
      forwardBackward: true,
    });
    expect(fixed.sourceCount).toBe(2);
    expect(Math.abs(fixed.bearingsDeg[0] + 12)).toBeLessThan(0.5);
    expect(Math.abs(fixed.bearingsDeg[1] - 15)).toBeLessThan(0.5);
    expect(codes(fixed)).not.toContain('coherent-sources-suspected');
    // Uncorrelated sources: no false alarm.
    expect(codes(estimateBearings({ snapshots: x, spacingWavelengths: 0.5, method: 'music' }))).not.toContain(
      'coherent-sources-suspected',
    );
  });

  it('warns few-snapshots, source-count-near-limit and ill-conditioned-covariance', () => {
    const y = simulateSnapshots({
      elements: 8,
      spacingWavelengths: 0.5,
      bearingsDeg: [0, 30],
      noisePower: 0.1,
      snapshots: 5,
      seed: 9,
    });
    const r = estimateBearings({ snapshots: y, spacingWavelengths: 0.5, method: 'music', sourceCount: 6 });
    expect(codes(r)).toEqual(
      expect.arrayContaining(['few-snapshots', 'source-count-near-limit', 'ill-conditioned-covariance']),
    );
    const m = estimateBearings({ snapshots: y, spacingWavelengths: 0.5, method: 'mvdr', sourceCount: 2 });
    expect(m.warnings.find((w) => w.code === 'ill-conditioned-covariance')?.message).toMatch(/pseudo-inverse/);
  });

  it('single-snapshot option: L = ⌊M/2⌋+1 and N counts as 1 for the rule', () => {
    const y = simulateSnapshots({
      elements: 16,
      spacingWavelengths: 0.5,
      bearingsDeg: [-10, 20],
      noisePower: 0.001,
      snapshots: 1,
      seed: 12,
    });
    const r = estimateBearings({
      snapshots: y,
      spacingWavelengths: 0.5,
      method: 'esprit-ls',
      singleSnapshot: true,
      sourceCount: 2,
    });
    expect(r.effectiveElements).toBe(9);
    expect(r.criteria.snapshotsUsed).toBe(1);
    expect(codes(r)).not.toContain('few-snapshots');
    expect(Math.abs(r.bearingsDeg[0] + 10)).toBeLessThan(0.2);
    expect(Math.abs(r.bearingsDeg[1] - 20)).toBeLessThan(0.2);
  });

  it('accepts rows (N × M) and gives the same answer as snapshots (M × N)', () => {
    const rows = zeros(x.cols, x.rows);
    for (let i = 0; i < x.rows; i++)
      for (let t = 0; t < x.cols; t++) {
        rows.re[t * x.rows + i] = x.re[i * x.cols + t];
        rows.im[t * x.rows + i] = x.im[i * x.cols + t];
      }
    const a = estimateBearings({ snapshots: x, spacingWavelengths: 0.5, method: 'root-music' });
    const b = estimateBearings({ rows, spacingWavelengths: 0.5, method: 'root-music' });
    expect(b.bearingsDeg).toEqual(a.bearingsDeg);
  });

  it('rejects bad input with a DoaInputError naming the problem', () => {
    const base = { snapshots: x, spacingWavelengths: 0.5, method: 'music' as const };
    const bad = (o: object, re: RegExp) => {
      expect(() => estimateBearings({ ...base, ...o } as never)).toThrow(DoaInputError);
      expect(() => estimateBearings({ ...base, ...o } as never)).toThrow(re);
    };
    bad({ method: 'fourier' }, /method "fourier" is not one of/);
    bad({ spacingWavelengths: 0 }, /spacingWavelengths must be a finite number of wavelengths > 0/);
    bad({ spacingWavelengths: NaN }, /spacingWavelengths/);
    bad({ sourceCount: 8 }, /sourceCount 8 must be below the 8 effective elements/);
    bad({ sourceCount: 5, smoothingSubarray: 5 }, /below the 5 effective/);
    bad({ sourceCount: -1 }, /sourceCount -1/);
    bad({ smoothingSubarray: 9 }, /smoothingSubarray 9 must be an integer from 2 to 8/);
    bad({ singleSnapshotSubarray: 4 }, /only used with singleSnapshot/);
    bad({ singleSnapshot: true, singleSnapshotSubarray: 1 }, /singleSnapshotSubarray 1/);
    bad({ sourceCountRule: 'bic' }, /sourceCountRule "bic"/);
    bad({ forwardBackward: 'yes' }, /forwardBackward must be true or false/);
    bad({ grid: { startDeg: -100, stepDeg: 1, count: 10 } }, /grid/);
    bad({ rows: x }, /exactly one of/);
    const one = fromNested([[1, 2, 3]]);
    bad({ snapshots: one }, /at least 2 elements, the data has 1/);
    const nan = clone(x);
    nan.re[5] = NaN;
    bad({ snapshots: nan }, /snapshot 5 \(0-based\), element 0/);
    bad({ snapshots: zeros(4, 10) }, /all zero/);
  });
});

describe('simulateSnapshots', () => {
  it('is deterministic per seed and differs across seeds', () => {
    const o = { elements: 4, spacingWavelengths: 0.5, bearingsDeg: [10], noisePower: 1, snapshots: 20 };
    expect(simulateSnapshots({ ...o, seed: 3 })).toEqual(simulateSnapshots({ ...o, seed: 3 }));
    expect(simulateSnapshots({ ...o, seed: 3 }).re).not.toEqual(simulateSnapshots({ ...o, seed: 4 }).re);
  });
  it('has the model covariance A·P·Aᴴ + σ²I in the large-N limit (powers 2 and 0.5, σ² = 0.3)', () => {
    const x = simulateSnapshots({
      elements: 3,
      spacingWavelengths: 0.5,
      bearingsDeg: [0, 30],
      powers: [2, 0.5],
      noisePower: 0.3,
      snapshots: 100000,
      seed: 6,
    });
    const r = sampleCovariance(x);
    // Diagonal = 2 + 0.5 + 0.3; R[0,1] = 2 + 0.5·e^{−jπ/2} = 2 − 0.5j (a_0 conj(a_1)). 4σ of the estimate ≈ 0.03.
    for (let i = 0; i < 3; i++) expect(Math.abs(r.re[i * 3 + i] - 2.8)).toBeLessThan(0.04);
    expect(Math.abs(r.re[1] - 2)).toBeLessThan(0.04);
    expect(Math.abs(r.im[1] + 0.5)).toBeLessThan(0.04);
  });
  it('fully coherent sources (ρ = 1) give a rank-one source covariance', () => {
    const x = simulateSnapshots({
      elements: 6,
      spacingWavelengths: 0.5,
      bearingsDeg: [-10, 20],
      noisePower: 0,
      snapshots: 50,
      correlation: 1,
      seed: 1,
    });
    const e = estimateBearings({ snapshots: x, spacingWavelengths: 0.5, method: 'music', sourceCount: 1 }).eigenvalues;
    expect(e[1] / e[0]).toBeLessThan(1e-14); // rounding level
  });
  it('uniforms lie in (0, 1) with mean ≈ ½, normals have variance ≈ 1', () => {
    const g = new SeededRandom(42);
    let s = 0;
    let s2 = 0;
    for (let i = 0; i < 20000; i++) {
      const u = g.next();
      expect(u > 0 && u < 1).toBe(true);
      s += u;
      const z = g.normal();
      s2 += z * z;
    }
    expect(Math.abs(s / 20000 - 0.5)).toBeLessThan(0.01);
    expect(Math.abs(s2 / 20000 - 1)).toBeLessThan(0.04);
  });
  it('rejects bad scenarios', () => {
    const o = { elements: 4, spacingWavelengths: 0.5, bearingsDeg: [10], noisePower: 1, snapshots: 20 };
    expect(() => simulateSnapshots({ ...o, bearingsDeg: [95] })).toThrow(/95° lies outside/);
    expect(() => simulateSnapshots({ ...o, correlation: 1.5 })).toThrow(/correlation 1.5/);
    expect(() => simulateSnapshots({ ...o, powers: [1, 2] })).toThrow(/2 powers for 1 bearings/);
    expect(() => simulateSnapshots({ ...o, elements: 1 })).toThrow(DoaInputError);
  });
});

describe('metrics', () => {
  function permutations(n: number): number[][] {
    if (n === 0) return [[]];
    return permutations(n - 1).flatMap((p) =>
      Array.from({ length: n }, (_, i) => [...p.slice(0, i), n - 1, ...p.slice(i)]),
    );
  }
  it('sorted pairing equals the brute-force optimum over all pairings (random cases)', () => {
    const g = new SeededRandom(7);
    for (let trial = 0; trial < 200; trial++) {
      const k = 1 + (trial % 5);
      const est = Array.from({ length: k }, () => 180 * g.next() - 90);
      const tru = Array.from({ length: k }, () => 180 * g.next() - 90);
      let bestMax = Infinity;
      let bestRmse = Infinity;
      for (const p of permutations(k)) {
        bestMax = Math.min(bestMax, Math.max(...p.map((j, i) => Math.abs(est[i] - tru[j]))));
        bestRmse = Math.min(bestRmse, Math.sqrt(p.reduce((a, j, i) => a + (est[i] - tru[j]) ** 2, 0) / k));
      }
      expect(matchingDistance(est, tru)).toBeCloseTo(bestMax, 12);
      expect(pairedRmse(est, tru)).toBeCloseTo(bestRmse, 12);
    }
  });
  it('rejects unequal counts and NaN', () => {
    expect(() => matchingDistance([1, 2], [1])).toThrow(/2 estimated bearing\(s\) against 1/);
    expect(() => pairedRmse([NaN], [1])).toThrow(DoaInputError);
    expect(matchingDistance([], [])).toBe(0);
  });
});
