import { describe, expect, it } from 'vitest';
import { normalizeDraft, designerReducer } from '@/lib/designer/state';
import {
  designFigures,
  designPattern,
  gratingLobesDeg,
  pairAdvice,
  separationCurves,
  deltaUToDegAtLook,
} from '@/lib/designer/analysis';
import { patternCsv, columnsCsv, fileSlug } from '@/lib/designer/export';
import checkValues from '@/fixtures/doa/check-values.json';

const draft = (elements: number, extra: Record<string, unknown> = {}) =>
  normalizeDraft({ name: 'x', elements, spacing: { value: 0.5, unit: 'wavelength' }, ...extra });

describe('designFigures against docs/references.md §3 (M = 10, d = λ/2, uniform, broadside; computed values)', () => {
  const f = designFigures(draft(10));
  it('half-power beamwidth 10.2092°', () => expect(f.halfPowerBeamwidthDeg!).toBeCloseTo(10.2092, 3));
  it('first-null beamwidth 2·asin(λ/(Md)) = 23.074°', () => expect(f.firstNullBeamwidthDeg!).toBeCloseTo(23.074, 3));
  it('peak sidelobe −12.966 dB (finite M)', () => expect(f.peakSidelobeDb!).toBeCloseTo(-12.966, 3));
  it('aperture (M−1)·d = 4.5 λ and grating-lobe-free scan 90° (docs/conventions.md §5)', () => {
    expect(f.apertureWavelengths).toBe(4.5);
    expect(f.gratingLobeFreeScanDeg).toBe(90);
    expect(f.scanExceedsGratingFree).toBe(false);
  });
  it('steered to 30°: HPBW 11.815° (docs/references.md §3, exact)', () => {
    expect(designFigures(draft(10, { steerDeg: 30 })).halfPowerBeamwidthDeg!).toBeCloseTo(11.815, 3);
  });
  it('Hamming taper, M = 10: peak sidelobe −35.81 dB (docs/references.md §4 array-taper table)', () => {
    expect(designFigures(draft(10, { taper: { kind: 'hamming' } })).peakSidelobeDb!).toBeCloseTo(-35.81, 2);
  });
  it('warns when the scan sector exceeds the grating-lobe-free scan: d = 0.6 λ → asin(1/0.6 − 1) = 41.81°', () => {
    const g = designFigures(
      normalizeDraft({ name: 'x', elements: 8, spacing: { value: 0.6, unit: 'wavelength' }, scanSectorDeg: 45 }),
    );
    expect(g.gratingLobeFreeScanDeg).toBeCloseTo(41.81, 2);
    expect(g.scanExceedsGratingFree).toBe(true);
    // docs/references.md §3: d < λ/(1 + sin 45°) = 0.5858 λ for ±45°.
    expect(g.maxSpacingForScanWavelengths).toBeCloseTo(0.5858, 4);
  });
  it('a disabled element changes the beam figures (fewer elements, wider beam)', () => {
    const s = designerReducer(draft(10), { type: 'toggleElement', index: 9 });
    const g = designFigures(s);
    // Nine enabled neighbours at λ/2 behave as a 9-element array: wider than 10.2092°.
    expect(g.halfPowerBeamwidthDeg!).toBeGreaterThan(10.5);
    expect(g.apertureWavelengths).toBe(4.5); // the geometry is unchanged
  });
});

describe('pattern and grating lobes', () => {
  it('peak-normalised pattern reads 0 dB at the steering angle', () => {
    const p = designPattern(draft(8, { steerDeg: 20 }));
    const i = Array.from(p.thetaDeg).findIndex((t) => Math.abs(t - 20) < 1e-9);
    expect(p.valuesDb[i]).toBeCloseTo(0, 9);
  });
  it('d = 1 λ at broadside has grating lobes at ±90° (u = ±1/d); d = λ/2 has none', () => {
    expect(gratingLobesDeg(1, 0)).toEqual([-90, 90]);
    expect(gratingLobesDeg(0.5, 0)).toEqual([]);
  });
});

describe('separation chart and planned pairs (M = 10, d = λ/2, N = 100, 0 dB)', () => {
  const s0 = draft(10, { snapshots: 100, snrDb: 0 });
  it('the statistical curve at M = 10 is Smith’s limit 1.7214° (docs/references.md §8; criterion from memory, value reproduced by fixtures/doa/generate_check_values.py)', () => {
    const c = separationCurves(s0);
    const i = Array.from(c.elements).indexOf(10);
    expect(c.statisticalLimitDeg[i]).toBeCloseTo(1.7214, 3);
    const reference = checkValues.smithLimits.find((r) => r.snapshots === 100 && r.snrLinear === 1)!;
    expect(Math.abs(c.statisticalLimitDeg[i] - reference.stochasticDeg)).toBeLessThan(1e-4);
    expect(c.rayleighGapU[i]).toBeCloseTo(0.2, 12);
  });

  it('warns on both sides of the Rayleigh gap 1/(M·d) = 0.2 in u (docs/conventions.md §5)', () => {
    const s = [0, 12, 23, 28, 29].reduce((st, b) => designerReducer(st, { type: 'addSource', bearingDeg: b }), s0);
    const pairs = pairAdvice(s);
    const find = (a: number, b: number) => pairs.find((p) => p.bearingsDeg[0] === a && p.bearingsDeg[1] === b)!;
    // sin 12° − sin 0° = 0.2079 > 0.2: resolvable.
    expect(find(0, 12).belowResolvableGap).toBe(false);
    expect(find(0, 12).verdict).toBe('resolvable');
    expect(find(0, 12).fixes).toEqual([]);
    // sin 23° − sin 12° = 0.1828 < 0.2: below the gap, above Smith's limit (~1.7°): needs MUSIC/ESPRIT.
    const p = find(12, 23);
    expect(p.belowResolvableGap).toBe(true);
    expect(p.verdict).toBe('needs-high-resolution');
    expect(p.outcome).toMatch(/one merged peak/);
    // 1/(0.1828·0.5) = 10.94 → 11 elements clear the gap.
    expect(p.fixes[0]).toMatch(/11 at this spacing/);
    // 28° → 29°: 1° apart, below the statistical limit at 0 dB and 100 snapshots.
    const q = find(28, 29);
    expect(q.verdict).toBe('unresolvable');
    expect(q.fixes.some((f) => /More snapshots: about \d+/.test(f))).toBe(true);
    expect(q.fixes.some((f) => /Higher SNR: about \+\d+ dB/.test(f))).toBe(true);
  });

  it('coincident sources are reported, not crashed on', () => {
    const s = [5, 5].reduce((st, b) => designerReducer(st, { type: 'addSource', bearingDeg: b }), s0);
    expect(pairAdvice(s)[0].verdict).toBe('coincident');
  });

  it('maps Δu to a separation centred on the look direction: at broadside 2·asin(Δu/2)', () => {
    expect(deltaUToDegAtLook(0.2, 0)).toBeCloseTo((2 * Math.asin(0.1) * 180) / Math.PI, 12);
    expect(Number.isNaN(deltaUToDegAtLook(0.5, 85))).toBe(true);
  });
});

describe('export helpers', () => {
  it('patternCsv writes metadata comments, a header and one row per point', () => {
    const csv = patternCsv({ thetaDeg: [-90, 0, 30], valuesDb: [-40, 0, -13.5] }, { array: 'Line, A', elements: 8 });
    const lines = csv.trimEnd().split('\n');
    expect(lines[0]).toBe('# array: Line, A');
    expect(lines[2]).toBe('theta_deg,u,level_db');
    expect(lines[4]).toBe('0,0,0');
    expect(lines[5].split(',').map(Number)[1]).toBeCloseTo(0.5, 15);
    expect(lines).toHaveLength(6);
    expect(() => patternCsv({ thetaDeg: [1], valuesDb: [] })).toThrow(/thetaDeg has 1 values but valuesDb has 0/);
  });
  it('columnsCsv leaves NaN empty; fileSlug makes safe names', () => {
    expect(columnsCsv({ m: [2, 3], y: [1.5, NaN] })).toBe('m,y\n2,1.5\n3,\n');
    expect(fileSlug('Port Alder 16-element line, 3 kHz')).toBe('port-alder-16-element-line-3-khz');
    expect(fileSlug('***')).toBe('array');
  });
});
