import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import {
  stochasticCrb,
  deterministicCrb,
  cramerRaoBound,
  statisticalResolutionLimit,
  pairResolvability,
  separationVersusAperture,
  bounds,
  type BoundsInput,
} from '@/lib/doa/bounds';
import { DoaInputError } from '@/lib/doa/errors';
import checkValues from '@/fixtures/doa/check-values.json';

interface CrbCase extends BoundsInput {
  bearingsDeg: number[];
  sourcePowers: number[];
  stochasticCovarianceRad2: number[][];
  deterministicCovarianceRad2: number[][];
  stochasticStdDeg: number[];
  deterministicStdDeg: number[];
}
const crbCases = (
  JSON.parse(readFileSync(path.join(__dirname, '../../../fixtures/doa/figures-crb.json'), 'utf8')) as {
    cases: CrbCase[];
  }
).cases;

const one = (over: Partial<BoundsInput> = {}): BoundsInput => ({
  elements: 10,
  spacingWavelengths: 0.5,
  bearingsDeg: [0],
  sourcePowers: [1],
  noisePower: 1,
  snapshots: 100,
  ...over,
});

describe('single-source CRB (docs/references.md §5 table, [computed]: matrix formula, closed form and Slepian–Bangs agree)', () => {
  it('M=10, N=100, 0 dB, θ=0: 0.141981° deterministic, 0.148911° stochastic', () => {
    expect(deterministicCrb(one()).stdDeg[0]).toBeCloseTo(0.141981, 6);
    expect(stochasticCrb(one()).stdDeg[0]).toBeCloseTo(0.148911, 6);
    // variances 6.140678e−6 and 6.754746e−6 rad²
    expect(deterministicCrb(one()).covarianceRad2[0]).toBeCloseTo(6.140678e-6, 11);
    expect(stochasticCrb(one()).covarianceRad2[0]).toBeCloseTo(6.754746e-6, 11);
  });
  it.each([
    // [label, input override, det std°, sto std°]
    ['θ=30°', { bearingsDeg: [30] }, 0.163946, 0.171948],
    ['10 dB', { sourcePowers: [10] }, 0.044898, 0.045122],
    ['−10 dB', { sourcePowers: [0.1] }, 0.448984, 0.634959],
    ['M=8', { elements: 8 }, 0.198991, 0.211062],
    ['M=16, N=1', { elements: 16, snapshots: 1 }, 0.699388, 0.720913],
  ] as const)('%s', (_l, over, det, sto) => {
    expect(deterministicCrb(one(over as Partial<BoundsInput>)).stdDeg[0]).toBeCloseTo(det, 6);
    expect(stochasticCrb(one(over as Partial<BoundsInput>)).stdDeg[0]).toBeCloseTo(sto, 6);
  });
  it('θ=60° deterministic 0.283962°', () => {
    expect(deterministicCrb(one({ bearingsDeg: [60] })).stdDeg[0]).toBeCloseTo(0.283962, 6);
  });
  it('equals the closed form 6/[N·SNR·M(M²−1)(2πd cosθ)²]·(1 + 1/(M·SNR)) for arbitrary inputs', () => {
    // docs/references.md §5 closed form [derived].
    const m = 13,
      n = 37,
      snr = 0.7,
      d = 0.43,
      th = -22;
    const c = 2 * Math.PI * d * Math.cos((th * Math.PI) / 180);
    const det = 6 / (n * snr * m * (m * m - 1) * c * c);
    const r = one({
      elements: m,
      snapshots: n,
      sourcePowers: [snr * 2],
      noisePower: 2,
      spacingWavelengths: d,
      bearingsDeg: [th],
    });
    expect(deterministicCrb(r).covarianceRad2[0] / det).toBeCloseTo(1, 12);
    expect(stochasticCrb(r).covarianceRad2[0] / (det * (1 + 1 / (m * snr)))).toBeCloseTo(1, 12);
  });
});

describe('two equal sources (docs/references.md §5, [computed]; M=10, N=100, 0 dB each)', () => {
  it.each([
    [10, [0.20656, 0.20975], [0.19675, 0.19978]],
    [5, [0.44212, 0.44381], [0.40269, 0.40422]],
    [3, [0.82697, 0.8281], [0.67806, 0.67899]],
  ] as const)('(0°, %i°)', (sep, sto, det) => {
    const input = one({ bearingsDeg: [0, sep], sourcePowers: [1, 1] });
    const s = stochasticCrb(input).stdDeg;
    const dt = deterministicCrb(input).stdDeg;
    for (let i = 0; i < 2; i++) {
      expect(s[i]).toBeCloseTo(sto[i], 5);
      expect(dt[i]).toBeCloseTo(det[i], 5);
    }
  });
});

describe('matrix-form fixtures (numpy dense formulas, fixtures/doa/generate_figures.py, tolerance 1e-9 relative)', () => {
  it.each(crbCases.map((c) => [c.elements, c.bearingsDeg.join(', '), c] as const))('M=%i, θ=(%s)', (_m, _b, c) => {
    const k = c.bearingsDeg.length;
    for (const [kind, cov, std] of [
      ['stochastic', c.stochasticCovarianceRad2, c.stochasticStdDeg],
      ['deterministic', c.deterministicCovarianceRad2, c.deterministicStdDeg],
    ] as const) {
      const r = cramerRaoBound(c, kind);
      for (let i = 0; i < k; i++) {
        expect(Math.abs(r.stdDeg[i] - std[i]) / std[i]).toBeLessThan(1e-9);
        for (let j = 0; j < k; j++) {
          const scale = Math.sqrt(cov[i][i] * cov[j][j]);
          expect(Math.abs(r.covarianceRad2[i * k + j] - cov[i][j]) / scale).toBeLessThan(1e-9);
        }
      }
    }
  });
});

describe('properties and scaling (docs/references.md §5, §9: scaling computed from the closed forms; the ordering from memory)', () => {
  it('CRB_sto ≥ CRB_det (Stoica & Nehorai 1990; from memory, consistent with the computed values)', () => {
    const cases: BoundsInput[] = [
      one(),
      one({ bearingsDeg: [0, 3], sourcePowers: [1, 1] }),
      one({ bearingsDeg: [-40, 5, 7, 50], sourcePowers: [0.1, 3, 1, 10], elements: 9, snapshots: 20 }),
      ...crbCases,
    ];
    for (const c of cases) {
      const s = stochasticCrb(c).stdDeg;
      const d = deterministicCrb(c).stdDeg;
      for (let i = 0; i < s.length; i++) expect(s[i]).toBeGreaterThanOrEqual(d[i] * (1 - 1e-12));
    }
  });
  it('std ∝ 1/√N exactly in both bounds', () => {
    for (const b of [stochasticCrb, deterministicCrb]) {
      const r = b(one({ bearingsDeg: [-5, 4], sourcePowers: [1, 2], snapshots: 100 })).stdDeg;
      const q = b(one({ bearingsDeg: [-5, 4], sourcePowers: [1, 2], snapshots: 400 })).stdDeg;
      expect(r[0] / q[0]).toBeCloseTo(2, 12);
      expect(r[1] / q[1]).toBeCloseTo(2, 12);
    }
  });
  it('element scaling ≈ M^(−3/2): ratios 0.9962, 0.9953, 0.9951 at M = 20, 40, 80 (normalised to M=10)', () => {
    const base = deterministicCrb(one()).stdDeg[0] * Math.pow(10, 1.5);
    const ratio = (m: number) => (deterministicCrb(one({ elements: m })).stdDeg[0] * Math.pow(m, 1.5)) / base;
    expect(ratio(20)).toBeCloseTo(0.9962, 4);
    expect(ratio(40)).toBeCloseTo(0.9953, 4);
    expect(ratio(80)).toBeCloseTo(0.9951, 4);
  });
  it('SNR: det ∝ SNR^(−1/2); sto/det = √2 at −10 dB for M=10', () => {
    const d1 = deterministicCrb(one({ sourcePowers: [1] })).stdDeg[0];
    const d100 = deterministicCrb(one({ sourcePowers: [100] })).stdDeg[0];
    expect(d1 / d100).toBeCloseTo(10, 12);
    const ratio =
      stochasticCrb(one({ sourcePowers: [0.1] })).stdDeg[0] / deterministicCrb(one({ sourcePowers: [0.1] })).stdDeg[0];
    expect(ratio).toBeCloseTo(Math.SQRT2, 12);
  });
  it('angle: std ∝ 1/|cos θ| (doubles at 60°); spacing: std ∝ 1/d', () => {
    const s0 = stochasticCrb(one()).stdDeg[0];
    expect(stochasticCrb(one({ bearingsDeg: [60] })).stdDeg[0] / s0).toBeCloseTo(2, 12);
    expect(stochasticCrb(one({ bearingsDeg: [-60] })).stdDeg[0] / s0).toBeCloseTo(2, 12);
    expect(stochasticCrb(one({ spacingWavelengths: 0.25 })).stdDeg[0] / s0).toBeCloseTo(2, 12);
  });
  it('does not mutate its inputs', () => {
    const bearings = [0, 5];
    const powers = [1, 1];
    stochasticCrb(one({ bearingsDeg: bearings, sourcePowers: powers }));
    expect(bearings).toEqual([0, 5]);
    expect(powers).toEqual([1, 1]);
  });
});

// The criterion is quoted from memory (docs/references.md §8). Its values are reproduced by the
// committed generator fixtures/doa/generate_check_values.py (scipy brentq on an independent numpy
// CRB, fixtures/doa/check-values.json); the 4-decimal values are the ones listed in §8.
describe('statistical resolution, Smith (2005) criterion δ = √CRB(δ) (criterion from memory; values reproduced by the generator)', () => {
  const limit = (snapshots: number, snr: number, bound: 'stochastic' | 'deterministic') =>
    statisticalResolutionLimit({
      elements: 10,
      spacingWavelengths: 0.5,
      centerDeg: 0,
      sourcePowers: [snr, snr],
      noisePower: 1,
      snapshots,
      bound,
    }).deltaDeg!;
  it('stochastic: 1.7214°, 0.9578°, 0.9684°', () => {
    expect(limit(100, 1, 'stochastic')).toBeCloseTo(1.7214, 4);
    expect(limit(100, 10, 'stochastic')).toBeCloseTo(0.9578, 4);
    expect(limit(1000, 1, 'stochastic')).toBeCloseTo(0.9684, 4);
  });
  it('deterministic: 1.6997°, 0.9565°, 0.9565°', () => {
    expect(limit(100, 1, 'deterministic')).toBeCloseTo(1.6997, 4);
    expect(limit(100, 10, 'deterministic')).toBeCloseTo(0.9565, 4);
    expect(limit(1000, 1, 'deterministic')).toBeCloseTo(0.9565, 4);
  });
  it('matches the generator (fixtures/doa/check-values.json) to 1e−6°', () => {
    for (const c of checkValues.smithLimits) {
      expect(Math.abs(limit(c.snapshots, c.snrLinear, 'stochastic') - c.stochasticDeg)).toBeLessThan(1e-6);
      expect(Math.abs(limit(c.snapshots, c.snrLinear, 'deterministic') - c.deterministicDeg)).toBeLessThan(1e-6);
    }
  });
  it('the limit is a fixed point: δ equals √(C11 + C22 − 2C12) there (consistency check)', () => {
    const delta = limit(100, 1, 'stochastic');
    const r = stochasticCrb(one({ bearingsDeg: [-delta / 2, delta / 2], sourcePowers: [1, 1] }));
    const c = r.covarianceRad2;
    expect(Math.sqrt(c[0] + c[3] - 2 * c[1]) * (180 / Math.PI)).toBeCloseTo(delta, 8);
  });
  it('deterministic limit scales as (N·SNR)^(−1/4) (docs/references.md §8: 1.6997/0.9565 ≈ 10^(1/4))', () => {
    expect(limit(100, 1, 'deterministic') / limit(1000, 1, 'deterministic')).toBeCloseTo(Math.pow(10, 0.25), 2);
  });
});

describe('pair resolvability', () => {
  it('flags pairs below the Rayleigh gap per docs/conventions.md §5 and gives a verdict', () => {
    const pairs = pairResolvability(one({ bearingsDeg: [0, 5, 30], sourcePowers: [1, 1, 1] }));
    expect(pairs.map((p) => [p.i, p.j])).toEqual([
      [0, 1],
      [0, 2],
      [1, 2],
    ]);
    // (0°, 5°): Δu = sin 5° = 0.0872 < 1/(10·0.5) = 0.2, but 5° exceeds the Smith limit ≈ 1.72°.
    expect(pairs[0].separationU).toBeCloseTo(Math.sin((5 * Math.PI) / 180), 14);
    expect(pairs[0].belowResolvableGap).toBe(true);
    expect(pairs[0].belowStatisticalLimit).toBe(false);
    expect(pairs[0].verdict).toBe('needs-high-resolution');
    expect(pairs[0].statisticalLimitDeg!).toBeGreaterThan(1.6);
    expect(pairs[1].verdict).toBe('resolvable');
    expect(pairs[1].criterion).toMatch(/Smith \(2005\)/);
  });
  it('calls a pair inside the statistical limit unresolvable, on both sides of the limit', () => {
    // Smith limit at M=10, N=100, 0 dB is 1.7214° (above); pairs at 1.5° and 2.0° straddle it.
    const below = pairResolvability(one({ bearingsDeg: [-0.75, 0.75], sourcePowers: [1, 1] }))[0];
    const above = pairResolvability(one({ bearingsDeg: [-1, 1], sourcePowers: [1, 1] }))[0];
    expect(below.verdict).toBe('unresolvable');
    expect(above.verdict).toBe('needs-high-resolution');
  });
  it('gap test is exactly |sin θ1 − sin θ2| < 1/(M·d)', () => {
    // docs/conventions.md §5; just above and just below the gap at M=10, d=0.5 (gap 0.2 in u).
    const above = Math.asin(0.2 + 1e-9) * (180 / Math.PI);
    const below = Math.asin(0.2 - 1e-9) * (180 / Math.PI);
    expect(pairResolvability(one({ bearingsDeg: [0, above], sourcePowers: [1, 1] }))[0].belowResolvableGap).toBe(false);
    expect(pairResolvability(one({ bearingsDeg: [0, below], sourcePowers: [1, 1] }))[0].belowResolvableGap).toBe(true);
  });
});

describe('separation-versus-aperture chart', () => {
  it('gives the Rayleigh gap and the Smith limit per element count', () => {
    const c = separationVersusAperture({
      elementCounts: [4, 10, 40],
      spacingWavelengths: 0.5,
      lookDeg: 0,
      snrDb: 0,
      snapshots: 100,
    });
    expect(Array.from(c.apertureWavelengths)).toEqual([1.5, 4.5, 19.5]);
    expect(c.rayleighGapU[1]).toBeCloseTo(0.2, 15);
    // Centred on broadside: 2·asin(Δu/2).
    expect(c.rayleighGapDeg[1]).toBeCloseTo(2 * Math.asin(0.1) * (180 / Math.PI), 12);
    // docs/references.md §8 [computed]: M=10, N=100, 0 dB → 1.7214°.
    expect(c.statisticalLimitDeg[1]).toBeCloseTo(1.7214, 4);
    expect(c.statisticalLimitU[1]).toBeCloseTo(2 * Math.sin((1.72136 * Math.PI) / 360), 6);
    // Both curves fall as the array grows; the statistical one faster than 1/M (≈ M^(−5/4) for the det limit, §8–9).
    expect(c.statisticalLimitDeg[0]).toBeGreaterThan(c.statisticalLimitDeg[1]);
    expect(c.statisticalLimitDeg[1]).toBeGreaterThan(c.statisticalLimitDeg[2]);
    expect(c.statisticalLimitU[1] / c.statisticalLimitU[2]).toBeGreaterThan(c.rayleighGapU[1] / c.rayleighGapU[2]);
  });
  it('off broadside the degree curves widen by about 1/cos θ0, the u curves hardly change', () => {
    const b = separationVersusAperture({
      elementCounts: [16],
      spacingWavelengths: 0.5,
      lookDeg: 0,
      snrDb: 5,
      snapshots: 200,
    });
    const s = separationVersusAperture({
      elementCounts: [16],
      spacingWavelengths: 0.5,
      lookDeg: 50,
      snrDb: 5,
      snapshots: 200,
    });
    expect(s.rayleighGapU[0]).toBe(b.rayleighGapU[0]);
    expect(s.rayleighGapDeg[0] / b.rayleighGapDeg[0]).toBeCloseTo(1 / Math.cos((50 * Math.PI) / 180), 1);
    expect(s.statisticalLimitU[0] / b.statisticalLimitU[0]).toBeCloseTo(1, 2);
  });
  it('marks values that do not fit as NaN (M=2 has no two-source bound)', () => {
    const c = separationVersusAperture({ elementCounts: [2, 3], spacingWavelengths: 0.5, snrDb: 0, snapshots: 10 });
    expect(Number.isNaN(c.statisticalLimitDeg[0])).toBe(true);
    // M=2, d=0.5: Δu = 1 centred on broadside is ±30°, which fits: 60°.
    expect(c.rayleighGapDeg[0]).toBeCloseTo(60, 12);
    expect(Number.isFinite(c.statisticalLimitDeg[1])).toBe(true);
    // M=2, d=0.25: Δu = 2 would need ±90°, which does not fit in view.
    const wide = separationVersusAperture({ elementCounts: [2], spacingWavelengths: 0.25, snrDb: 0, snapshots: 10 });
    expect(Number.isNaN(wide.rayleighGapDeg[0])).toBe(true);
  });
});

describe('v1 bounds answer', () => {
  it('has exactly the API keys and values', () => {
    const a = bounds({
      array: { elements: 10, spacingWavelengths: 0.5 },
      bearingsDeg: [0, 5],
      sourcePowers: [1, 1],
      noisePower: 1,
      snapshots: 100,
    });
    expect(Object.keys(a).sort()).toEqual(['crbStdDeg', 'pairs', 'rayleighGapU']);
    // docs/references.md §5 [computed]: (0°, 5°) stochastic 0.44212°, 0.44381°.
    expect(a.crbStdDeg[0]).toBeCloseTo(0.44212, 5);
    expect(a.crbStdDeg[1]).toBeCloseTo(0.44381, 5);
    expect(a.rayleighGapU).toBeCloseTo(0.2, 15);
    expect(a.pairs).toHaveLength(1);
    expect(Object.keys(a.pairs[0]).sort()).toEqual(['belowResolvableGap', 'i', 'j', 'separationU']);
    expect(a.pairs[0]).toMatchObject({ i: 0, j: 1, belowResolvableGap: true });
    expect(JSON.parse(JSON.stringify(a))).toEqual(a);
  });
});

describe('bad input', () => {
  it('names the argument', () => {
    expect(() => stochasticCrb(one({ elements: 1 }))).toThrow(/elements/);
    expect(() => stochasticCrb(one({ spacingWavelengths: 0 }))).toThrow(/spacingWavelengths/);
    expect(() => stochasticCrb(one({ bearingsDeg: [] }))).toThrow(/bearingsDeg/);
    expect(() => stochasticCrb(one({ bearingsDeg: [NaN] }))).toThrow(/bearingsDeg\[0\]/);
    expect(() => stochasticCrb(one({ bearingsDeg: [90] }))).toThrow(/endfire/);
    expect(() => stochasticCrb(one({ bearingsDeg: [0, 1], sourcePowers: [1] }))).toThrow(
      /sourcePowers has 1 entries, expected 2/,
    );
    expect(() => stochasticCrb(one({ sourcePowers: [0] }))).toThrow(/sourcePowers\[0\]/);
    expect(() => stochasticCrb(one({ noisePower: -1 }))).toThrow(/noisePower/);
    expect(() => stochasticCrb(one({ snapshots: 0 }))).toThrow(/snapshots/);
    expect(() => stochasticCrb(one({ snapshots: 2.5 }))).toThrow(/snapshots/);
    expect(() => stochasticCrb(one({ elements: 3, bearingsDeg: [0, 10, 20], sourcePowers: [1, 1, 1] }))).toThrow(
      /fewer sources than elements/,
    );
    expect(() => stochasticCrb(one({ bearingsDeg: [10, 10], sourcePowers: [1, 1] }))).toThrow(/same electrical angle/);
    // d = 1: θ = 0 and θ = 90−… alias; sin 30° vs sin −30° differ by 1 → ψ differs by 2π.
    expect(() => stochasticCrb(one({ spacingWavelengths: 1, bearingsDeg: [-30, 30], sourcePowers: [1, 1] }))).toThrow(
      /grating-lobe aliases/,
    );
    expect(() => cramerRaoBound(one(), 'bayesian' as never)).toThrow(/bound/);
    expect(() => separationVersusAperture({ spacingWavelengths: 0.5, snrDb: NaN, snapshots: 10 })).toThrow(/snrDb/);
    expect(() =>
      separationVersusAperture({ elementCounts: [10, 1], spacingWavelengths: 0.5, snrDb: 0, snapshots: 10 }),
    ).toThrow(/elementCounts\[1\]/);
    expect(() =>
      bounds({ array: null as never, bearingsDeg: [0], sourcePowers: [1], noisePower: 1, snapshots: 1 }),
    ).toThrow(DoaInputError);
    expect(() =>
      statisticalResolutionLimit({
        elements: 10,
        spacingWavelengths: 0.5,
        centerDeg: 90,
        sourcePowers: [1, 1],
        noisePower: 1,
        snapshots: 10,
      }),
    ).toThrow(/centerDeg/);
  });
});
