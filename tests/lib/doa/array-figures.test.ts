import { describe, expect, it } from 'vitest';
import {
  apertureWavelengths,
  gratingLobeFreeScanDeg,
  maxSpacingForScan,
  rayleighGap,
  halfPowerBeamwidth,
  halfPowerBeamwidthDeg,
  halfPowerBeamwidthFactor,
  firstNullBeamwidthDeg,
  firstNullBeamwidth,
  peakSidelobe,
  peakSidelobeDb,
  directivity,
  arrayMetrics,
} from '@/lib/doa/design/array-figures';
import { beamPattern } from '@/lib/doa/design/beam-pattern';
import checkValues from '@/fixtures/doa/check-values.json';

const half = { spacingWavelengths: 0.5 };

describe('uniform array, exact figures', () => {
  it.each([
    // docs/references.md §3 [computed]: finite-M peak sidelobes at d = λ/2.
    [8, -12.797],
    [10, -12.966],
    [16, -13.147],
    [32, -13.233],
    [100, -13.259],
  ])('M=%i peak sidelobe %f dB', (m, db) => {
    expect(peakSidelobeDb({ elements: m, ...half })).toBeCloseTo(db, 3);
  });
  it('approaches the continuous-aperture −13.2615 dB for large M', () => {
    // docs/references.md §3 [computed]: first sidelobe of sin x / x at x = 4.493409 → −13.2615 dB.
    expect(peakSidelobeDb({ elements: 2000, ...half })!).toBeCloseTo(-13.2615, 3);
  });
  it('half-power beamwidths at broadside and steered (M=10, d=λ/2)', () => {
    // docs/references.md §3 [computed]: 10.2092°; steered 30° → 11.815°, 45° → 14.578°, 60° → 21.755°.
    expect(halfPowerBeamwidthDeg({ elements: 10, ...half })).toBeCloseTo(10.2092, 4);
    expect(halfPowerBeamwidthDeg({ elements: 10, ...half, steerDeg: 30 })).toBeCloseTo(11.815, 3);
    expect(halfPowerBeamwidthDeg({ elements: 10, ...half, steerDeg: 45 })).toBeCloseTo(14.578, 3);
    expect(halfPowerBeamwidthDeg({ elements: 10, ...half, steerDeg: 60 })).toBeCloseTo(21.755, 3);
    expect(halfPowerBeamwidthDeg({ elements: 10, ...half, steerDeg: -60 })).toBeCloseTo(21.755, 3);
    // Δu = 0.177948 and M=16 → 6.3587°, M=100 → 1.0152° [computed].
    expect(halfPowerBeamwidth({ elements: 10, ...half }).widthU).toBeCloseTo(0.177948, 6);
    expect(halfPowerBeamwidthDeg({ elements: 16, ...half })).toBeCloseTo(6.3587, 4);
    expect(halfPowerBeamwidthDeg({ elements: 100, ...half })).toBeCloseTo(1.0152, 4);
  });
  it('half-power edges really sit at −3.0103 dB of the pattern', () => {
    // Definition (docs/conventions.md §5): full width at −3.0103 dB; checked by evaluating the pattern at the edges.
    const w = halfPowerBeamwidth({ elements: 12, spacingWavelengths: 0.4, steerDeg: 17 });
    const p = beamPattern({ elements: 12, spacingWavelengths: 0.4, steerDeg: 17, thetaDeg: w.edgesDeg });
    expect(p.valuesDb[0]).toBeCloseTo(-10 * Math.log10(2), 9);
    expect(p.valuesDb[1]).toBeCloseTo(-10 * Math.log10(2), 9);
  });
  it('first-null beamwidth (M=10, d=λ/2)', () => {
    // docs/references.md §3 [computed]: 2·asin(λ/(Md)) = 23.074°.
    expect(firstNullBeamwidthDeg({ elements: 10, ...half })).toBeCloseTo(23.074, 3);
    // Steered closed form asin(u0 + 1/(Md)) − asin(u0 − 1/(Md)) (same null positions in u).
    const u0 = Math.sin((25 * Math.PI) / 180);
    const expected = (Math.asin(u0 + 0.2) - Math.asin(u0 - 0.2)) * (180 / Math.PI);
    expect(firstNullBeamwidthDeg({ elements: 10, ...half, steerDeg: 25 })).toBeCloseTo(expected, 9);
  });
  it('clips a beam that reaches endfire', () => {
    const w = halfPowerBeamwidth({ elements: 3, spacingWavelengths: 0.5, steerDeg: 80 });
    expect(w.clipped).toBe(true);
    expect(w.edgesDeg[1]).toBe(90);
  });
});

describe('tapers (docs/references.md §4 array-taper table, [computed])', () => {
  it.each([
    [20, 10, 0.9746, 16, 0.9464],
    [26, 10, 1.0753, 16, 1.05],
    [30, 10, 1.1353, 16, 1.1133],
    [40, 10, 1.2636, 16, 1.2543],
    [60, 10, 1.4483, 16, 1.4797],
  ])('Chebyshev %i dB: equal sidelobes at the design level and the HPBW factors', (sl, m1, k1, m2, k2) => {
    // Dolph (1946): every sidelobe at the design level; factors k of HPBW = k·λ/(Md) from docs/references.md §4.
    for (const [m, k] of [
      [m1, k1],
      [m2, k2],
    ]) {
      const taper = { kind: 'chebyshev' as const, sidelobeDb: sl };
      expect(peakSidelobeDb({ elements: m, ...half, taper })).toBeCloseTo(-sl, 6);
      expect(halfPowerBeamwidthFactor({ elements: m, taper })).toBeCloseTo(k, 4);
    }
  });
  it('Chebyshev sidelobes are all equal (not just the highest)', () => {
    // Dolph (1946): equiripple sidelobes. Every local maximum of the pattern outside the main lobe sits at −30 dB.
    const p = beamPattern({
      elements: 12,
      ...half,
      taper: { kind: 'chebyshev', sidelobeDb: 30 },
      u: Float64Array.from({ length: 20001 }, (_, i) => -1 + i * 1e-4),
      normalize: 'peak',
    });
    const v = p.valuesDb;
    const peaks: number[] = [];
    for (let i = 1; i < v.length - 1; i++) if (v[i] > v[i - 1] && v[i] >= v[i + 1] && v[i] < -1) peaks.push(v[i]);
    expect(peaks.length).toBeGreaterThanOrEqual(10);
    for (const pk of peaks) expect(pk).toBeCloseTo(-30, 2);
  });
  it('uniform and Hamming factors and sidelobes', () => {
    // docs/references.md §4: uniform k = 0.8897 (M=10), 0.8874 (M=16); Hamming 1.3929 / −35.81 dB (M=10), 1.3581 / −39.37 dB (M=16).
    expect(halfPowerBeamwidthFactor({ elements: 10 })).toBeCloseTo(0.8897, 4);
    expect(halfPowerBeamwidthFactor({ elements: 16 })).toBeCloseTo(0.8874, 4);
    expect(halfPowerBeamwidthFactor({ elements: 10, taper: 'hamming' })).toBeCloseTo(1.3929, 4);
    expect(halfPowerBeamwidthFactor({ elements: 16, taper: 'hamming' })).toBeCloseTo(1.3581, 4);
    expect(peakSidelobeDb({ elements: 10, ...half, taper: 'hamming' })).toBeCloseTo(-35.81, 2);
    expect(peakSidelobeDb({ elements: 16, ...half, taper: 'hamming' })).toBeCloseTo(-39.37, 2);
  });
  it('a taper widens the beam and lowers the sidelobes', () => {
    // Common practice (Harris 1978): every taper here trades beamwidth for sidelobe level.
    for (const taper of ['hann', 'hamming'] as const) {
      expect(halfPowerBeamwidthDeg({ elements: 20, ...half, taper })).toBeGreaterThan(
        halfPowerBeamwidthDeg({ elements: 20, ...half }),
      );
      expect(peakSidelobeDb({ elements: 20, ...half, taper })!).toBeLessThan(-25);
    }
  });
});

describe('grating lobes and Rayleigh gap', () => {
  it('grating-lobe-free scan per docs/conventions.md §5 and the limits of docs/references.md §3', () => {
    // docs/conventions.md §5: d ≤ 0.5 → 90; 0.5 < d < 1 → asin(1/d − 1); d ≥ 1 → 0.
    expect(gratingLobeFreeScanDeg(0.25)).toBe(90);
    expect(gratingLobeFreeScanDeg(0.5)).toBe(90);
    expect(gratingLobeFreeScanDeg(1)).toBe(0);
    expect(gratingLobeFreeScanDeg(1.7)).toBe(0);
    // docs/references.md §3 [computed] spacing limits: 30° → 0.6667λ, 45° → 0.5858λ, 60° → 0.5359λ.
    expect(gratingLobeFreeScanDeg(2 / 3)).toBeCloseTo(30, 9);
    expect(gratingLobeFreeScanDeg(0.585786)).toBeCloseTo(45, 3);
    expect(gratingLobeFreeScanDeg(0.535898)).toBeCloseTo(60, 3);
    expect(maxSpacingForScan(45)).toBeCloseTo(0.5858, 4);
    expect(maxSpacingForScan(0)).toBe(1);
    expect(maxSpacingForScan(90)).toBeCloseTo(0.5, 12);
  });
  it('a pattern steered to the limit shows the grating lobe just reaching endfire', () => {
    // Consistency: at d = 0.6 the limit is asin(1/0.6 − 1) = 41.81°; steering there puts the grating lobe at u = −1.
    const d = 0.6;
    const scan = gratingLobeFreeScanDeg(d);
    const p = beamPattern({ elements: 16, spacingWavelengths: d, steerDeg: scan, thetaDeg: [-90] });
    expect(p.valuesDb[0]).toBeCloseTo(0, 9);
  });
  it('Rayleigh gap in u and degrees', () => {
    // docs/conventions.md §5 and docs/references.md §3 [computed]: d = λ/2, M=8 → 14.478°, M=10 → 11.537°, M=16 → 7.181°.
    expect(rayleighGap(10, 0.5).u).toBeCloseTo(0.2, 15);
    expect(rayleighGap(8, 0.5).degAtBroadside).toBeCloseTo(14.478, 3);
    expect(rayleighGap(10, 0.5).degAtBroadside).toBeCloseTo(11.537, 3);
    expect(rayleighGap(16, 0.5).degAtBroadside).toBeCloseTo(7.181, 3);
    expect(rayleighGap(2, 0.3).degAtBroadside).toBe(90);
  });
});

describe('directivity (docs/references.md §3)', () => {
  it('equals M at d = λ/2 and matches the computed values', () => {
    // docs/references.md §3: D = M exactly at d = λ/2 (uniform); M=10 d=0.25 → 5.166, d=0.7 → 13.686 [computed].
    expect(directivity({ elements: 10, ...half }).linear).toBeCloseTo(10, 10);
    expect(directivity({ elements: 16, ...half }).db).toBeCloseTo(12.04, 2);
    expect(directivity({ elements: 10, spacingWavelengths: 0.25 }).linear).toBeCloseTo(5.166, 3);
    expect(directivity({ elements: 10, spacingWavelengths: 0.7 }).linear).toBeCloseTo(13.686, 3);
  });
  it('with a taper at d = λ/2 equals M·η, η = (Σw)²/(MΣw²)', () => {
    // docs/references.md §3: taper efficiency.
    const d = directivity({ elements: 12, ...half, taper: 'hamming' }).linear;
    const w = Array.from({ length: 12 }, (_, i) => 0.54 - 0.46 * Math.cos((2 * Math.PI * i) / 11));
    const s = w.reduce((a, b) => a + b, 0);
    const s2 = w.reduce((a, b) => a + b * b, 0);
    expect(d).toBeCloseTo((s * s) / s2, 10);
  });
  it('does not depend on steering at d = λ/2 (off-diagonal terms vanish)', () => {
    expect(directivity({ elements: 10, ...half, steerDeg: 40 }).linear).toBeCloseTo(10, 10);
  });
});

describe('v1 metrics object', () => {
  it('has exactly the API keys with the docs/conventions.md §5 values', () => {
    const m = arrayMetrics(10, 0.5);
    expect(Object.keys(m).sort()).toEqual([
      'apertureWavelengths',
      'gratingLobeFreeScanDeg',
      'halfPowerBeamwidthDeg',
      'peakSidelobeDb',
      'rayleighGapDeg',
    ]);
    expect(m.apertureWavelengths).toBe(4.5);
    expect(m.halfPowerBeamwidthDeg).toBeCloseTo(10.2092, 4);
    expect(m.rayleighGapDeg).toBeCloseTo(11.537, 3);
    expect(m.peakSidelobeDb).toBeCloseTo(-12.966, 3);
    expect(m.gratingLobeFreeScanDeg).toBe(90);
    expect(apertureWavelengths(32, 0.75)).toBe(23.25);
  });
  it('reports no sidelobe for two elements and handles grating-lobe spacings', () => {
    // M=2: |AF| = |cos(ψ/2)| has no sidelobes at all.
    expect(arrayMetrics(2, 0.5).peakSidelobeDb).toBeNull();
    // d = 1.5: the grating lobes are excluded, so the sidelobe is the M=10 value again.
    const m = arrayMetrics(10, 1.5);
    expect(m.peakSidelobeDb).toBeCloseTo(-12.966, 3);
    expect(m.gratingLobeFreeScanDeg).toBe(0);
    expect(peakSidelobe({ elements: 10, spacingWavelengths: 1.5 }).atDeg).not.toBeNull();
  });
  it('a short array at small spacing sees only part of its sidelobes', () => {
    // Visible region |u| ≤ 1: with M=4, d=0.1 the whole visible region lies inside the main lobe.
    expect(peakSidelobeDb({ elements: 4, spacingWavelengths: 0.1 })).toBeNull();
    expect(peakSidelobeDb({ elements: 4, spacingWavelengths: 0.1, region: 'full-period' })).toBeCloseTo(
      peakSidelobeDb({ elements: 4, ...half })!,
      9,
    );
  });
});

describe('disabled elements and calibration', () => {
  it('a disabled element raises the sidelobes and the figures follow the pattern', () => {
    const enabled = Array.from({ length: 16 }, (_, i) => i !== 5);
    const full = peakSidelobeDb({ elements: 16, ...half })!;
    const holed = peakSidelobe({ elements: 16, ...half, enabled });
    expect(holed.peakSidelobeDb!).toBeGreaterThan(full);
    const p = beamPattern({ elements: 16, ...half, enabled, thetaDeg: [holed.atDeg!], normalize: 'coherent' });
    // The reported level is relative to the main-lobe peak, which for real weights is at the steering angle.
    expect(p.valuesDb[0]).toBeCloseTo(holed.peakSidelobeDb!, 6);
  });
  it('with random calibration the figures agree with a numpy evaluation of the array factor (fixtures/doa/generate_check_values.py)', () => {
    // Outside reference: numpy/scipy evaluate AF(u) = Σ w_m g_m exp(+j·2π·d·m·(u − u0)) on a 1e−6 grid
    // and refine the peaks, nulls and −3.0103 dB edges (fixtures/doa/check-values.json, `calibratedBeam`).
    const ref = checkValues.calibratedBeam;
    const opts = {
      elements: ref.elements,
      spacingWavelengths: ref.spacingWavelengths,
      steerDeg: ref.steerDeg,
      gainDb: ref.gainDb,
      phaseDeg: ref.phaseDeg,
      taper: 'hann' as const,
    };
    const sidelobe = peakSidelobe(opts);
    expect(Math.abs(sidelobe.peakSidelobeDb! - ref.peakSidelobeDb)).toBeLessThan(1e-4);
    expect(Math.abs(sidelobe.atDeg! - ref.peakSidelobeAtDeg)).toBeLessThan(1e-3);
    const hp = halfPowerBeamwidth(opts);
    expect(Math.abs(hp.edgesDeg[0] - ref.halfPowerEdgesDeg[0])).toBeLessThan(1e-3);
    expect(Math.abs(hp.edgesDeg[1] - ref.halfPowerEdgesDeg[1])).toBeLessThan(1e-3);
    const fn = firstNullBeamwidth(opts);
    expect(Math.abs(fn.edgesDeg[0] - ref.firstNullsDeg[0])).toBeLessThan(1e-3);
    expect(Math.abs(fn.edgesDeg[1] - ref.firstNullsDeg[1])).toBeLessThan(1e-3);
  });
  it('with random calibration the figures agree with a brute-force scan of the pattern (consistency check)', () => {
    // Consistency check (the library against itself): a dense u grid (1e−5 steps) evaluated by the
    // library's own beamPattern — itself checked against numpy in beam-pattern.test.ts; the sidelobe
    // maximum outside the first nulls and the −3.0103 dB crossings must agree with the refined figures.
    const gainDb = [0.4, -0.8, 0.1, 1.2, -0.3, 0.0, 0.7, -1.1, 0.2, 0.5, -0.6, 0.3];
    const phaseDeg = [3, -7, 12, -4, 0, 9, -11, 5, 2, -6, 8, -1];
    const opts = { elements: 12, spacingWavelengths: 0.55, steerDeg: 15, gainDb, phaseDeg, taper: 'hann' as const };
    const u = Float64Array.from({ length: 200001 }, (_, i) => -1 + i * 1e-5);
    const p = beamPattern({ ...opts, u, normalize: 'peak' });
    const fn = firstNullBeamwidth(opts);
    const nullU = fn.edgesDeg.map((t) => Math.sin((t * Math.PI) / 180));
    let best = -Infinity;
    for (let i = 0; i < u.length; i++) if (u[i] < nullU[0] || u[i] > nullU[1]) best = Math.max(best, p.valuesDb[i]);
    const psl = peakSidelobeDb(opts)!;
    expect(Math.abs(psl - best)).toBeLessThan(1e-3);
    const hp = halfPowerBeamwidth(opts);
    // Half-power edges: 3.0103 dB below the main-lobe peak (taken from the dense grid, coherent reference).
    const edges = beamPattern({ ...opts, thetaDeg: hp.edgesDeg });
    const dense = beamPattern({ ...opts, u });
    let peakCoherent = -Infinity;
    for (const v of dense.valuesDb) peakCoherent = Math.max(peakCoherent, v);
    expect(edges.valuesDb[0] - peakCoherent).toBeCloseTo(-10 * Math.log10(2), 6);
    expect(edges.valuesDb[1] - peakCoherent).toBeCloseTo(-10 * Math.log10(2), 6);
  });
  it('a linear phase error steers the beam, and the half-power width follows the shifted lobe', () => {
    // A phase ramp of φ per element shifts the beam by Δψ = −φ; width in u is unchanged.
    const phaseDeg = Array.from({ length: 10 }, (_, i) => -6 * i);
    const w = halfPowerBeamwidth({ elements: 10, ...half, phaseDeg });
    expect(w.widthU).toBeCloseTo(0.177948, 5);
    const shiftU = (6 * Math.PI) / 180 / (2 * Math.PI * 0.5);
    expect((Math.sin((w.edgesDeg[0] * Math.PI) / 180) + Math.sin((w.edgesDeg[1] * Math.PI) / 180)) / 2).toBeCloseTo(
      shiftU,
      6,
    );
  });
});

describe('bad input', () => {
  it('names the argument', () => {
    expect(() => arrayMetrics(1, 0.5)).toThrow(/elements must be at least 2/);
    expect(() => arrayMetrics(10, -0.5)).toThrow(/spacingWavelengths/);
    expect(() => arrayMetrics(10, Number.NaN)).toThrow(/spacingWavelengths/);
    expect(() => arrayMetrics(1e6, 0.5)).toThrow(/at most/);
    expect(() => halfPowerBeamwidthDeg({ elements: 10, ...half, steerDeg: Infinity })).toThrow(/steerDeg/);
    expect(() => gratingLobeFreeScanDeg(0)).toThrow(/spacingWavelengths/);
    expect(() => peakSidelobeDb({ elements: 10, ...half, region: 'all' as never })).toThrow(/region/);
    expect(() => maxSpacingForScan(95)).toThrow(/scanDeg/);
  });
});
