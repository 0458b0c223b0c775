import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import {
  taperWeights,
  chebyshevWeights,
  chebyshevPolynomial,
  beamPattern,
  effectiveWeights,
  thetaGridDeg,
} from '@/lib/doa/design/beam-pattern';
import { DoaInputError } from '@/lib/doa/errors';

function fixture<T>(name: string): T {
  return JSON.parse(readFileSync(path.join(__dirname, '../../../fixtures/doa', name), 'utf8')) as T;
}

interface ChebCase {
  elements: number;
  sidelobeDb: number;
  weights: number[];
}
interface BeamCase {
  elements: number;
  spacingWavelengths: number;
  steerDeg: number;
  taper: string;
  weights: number[];
  enabled: boolean[];
  gainDb: number[];
  phaseDeg: number[];
  thetaDeg: number[];
  valuesDb: number[];
}

describe('Dolph–Chebyshev weights', () => {
  const cases = fixture<{ cases: ChebCase[] }>('figures-chebwin.json').cases;
  it.each(cases.map((c) => [c.elements, c.sidelobeDb, c] as const))(
    'M=%i, %i dB match scipy chebwin to 1e-9',
    (_m, _s, c) => {
      // scipy.signal.windows.chebwin(M, at) / max (fixtures/doa/generate_figures.py), tolerance 1e-9 absolute.
      const w = chebyshevWeights(c.elements, c.sidelobeDb);
      expect(w.length).toBe(c.weights.length);
      for (let i = 0; i < w.length; i++) expect(Math.abs(w[i] - c.weights[i])).toBeLessThan(1e-9);
    },
  );
  it('gives the 10-element 26 dB edge-normalised weights of docs/references.md §4', () => {
    // docs/references.md §4 [computed with chebwin]: 1, 1.35548, 1.96793, 2.47871, 2.76948 (mirrored).
    const w = chebyshevWeights(10, 26);
    const expected = [1, 1.35548, 1.96793, 2.47871, 2.76948];
    for (let i = 0; i < 5; i++) {
      expect(w[i] / w[0]).toBeCloseTo(expected[i], 5);
      expect(w[9 - i]).toBeCloseTo(w[i], 14);
    }
    // Voltage ratio exactly 20 (26.02 dB): 1, 1.35705, 1.97091, 2.48299, 2.77454 [computed].
    const w20 = chebyshevWeights(10, 20 * Math.log10(20));
    [1, 1.35705, 1.97091, 2.48299, 2.77454].forEach((v, i) => expect(w20[i] / w20[0]).toBeCloseTo(v, 5));
  });
  it('Chebyshev polynomial identities', () => {
    // T_n(cos t) = cos(n t), T_n(cosh t) = cosh(n t), T_n(−x) = (−1)^n T_n(x) (textbook identities).
    expect(chebyshevPolynomial(5, Math.cos(0.3))).toBeCloseTo(Math.cos(1.5), 14);
    expect(chebyshevPolynomial(4, Math.cosh(0.2))).toBeCloseTo(Math.cosh(0.8), 12);
    expect(chebyshevPolynomial(3, -1.5)).toBeCloseTo(-chebyshevPolynomial(3, 1.5), 12);
  });
});

describe('other tapers', () => {
  it('Hamming equals the symmetric 0.54/0.46 definition', () => {
    // Harris (1978) Hamming coefficients 0.54/0.46 over M points (symmetric, as scipy hamming(M, sym=True)).
    const w = taperWeights(8, 'hamming');
    const max = 0.54 - 0.46 * Math.cos((2 * Math.PI * 3) / 7);
    for (let i = 0; i < 8; i++) expect(w[i]).toBeCloseTo((0.54 - 0.46 * Math.cos((2 * Math.PI * i) / 7)) / max, 14);
  });
  it('Hann has no zero end weights and is symmetric', () => {
    // Choice documented in beam-pattern.ts: sin²(π(m+1)/(M+1)) = scipy hann(M+2)[1:-1].
    const w = taperWeights(9, 'hann');
    expect(w[4]).toBe(1);
    expect(w[0]).toBeCloseTo(Math.sin(Math.PI / 10) ** 2, 14);
    for (let i = 0; i < 9; i++) expect(w[i]).toBeCloseTo(w[8 - i], 14);
  });
  it('uniform is all ones', () => {
    expect(Array.from(taperWeights(5))).toEqual([1, 1, 1, 1, 1]);
  });
});

describe('beam pattern', () => {
  const cases = fixture<{ cases: BeamCase[] }>('figures-beam.json').cases;
  it.each(cases.map((c) => [c.taper, c] as const))('%s case matches the numpy pattern to 1e-9 dB', (_t, c) => {
    // fixtures/doa/generate_figures.py evaluates AF with numpy; tolerance 1e-9 dB where the level is above −100 dB.
    const p = beamPattern({
      elements: c.elements,
      spacingWavelengths: c.spacingWavelengths,
      steerDeg: c.steerDeg,
      weights: c.weights,
      enabled: c.enabled,
      gainDb: c.gainDb,
      phaseDeg: c.phaseDeg,
      thetaDeg: c.thetaDeg,
    });
    for (let i = 0; i < c.valuesDb.length; i++) {
      if (c.valuesDb[i] > -100) expect(Math.abs(p.valuesDb[i] - c.valuesDb[i])).toBeLessThan(1e-9);
      else expect(p.valuesDb[i]).toBeLessThan(-90);
    }
  });
  it('uniform pattern equals the closed form |sin(Mψ/2)/(M sin(ψ/2))| on a u grid', () => {
    // docs/references.md §3 closed form (textbook).
    const m = 16;
    const d = 0.5;
    const u = Float64Array.from({ length: 401 }, (_, i) => -1 + i * 0.005);
    const p = beamPattern({ elements: m, spacingWavelengths: d, steerDeg: 20, u });
    const u0 = Math.sin((20 * Math.PI) / 180);
    for (let i = 0; i < u.length; i++) {
      const psi = 2 * Math.PI * d * (u[i] - u0);
      const exact = Math.abs(psi) < 1e-12 ? 1 : Math.abs(Math.sin((m * psi) / 2) / (m * Math.sin(psi / 2)));
      const db = Math.max(-150, 20 * Math.log10(exact));
      if (db > -100) expect(p.valuesDb[i]).toBeCloseTo(db, 9);
    }
  });
  it('peaks at 0 dB at the steering angle and reports the coherent reference', () => {
    const p = beamPattern({
      elements: 10,
      spacingWavelengths: 0.5,
      steerDeg: -35,
      thetaDeg: [-35, 0],
      taper: 'hamming',
    });
    expect(p.valuesDb[0]).toBeCloseTo(0, 12);
    expect(p.valuesDb[1]).toBeLessThan(-20);
    const sum = Array.from(taperWeights(10, 'hamming')).reduce((a, b) => a + b, 0);
    expect(p.referenceMagnitude).toBeCloseTo(sum, 12);
  });
  it('peak normalisation puts the grid maximum at 0 dB', () => {
    const p = beamPattern({
      elements: 8,
      spacingWavelengths: 0.5,
      phaseDeg: [0, 10, -20, 5, 30, 0, -10, 15],
      normalize: 'peak',
    });
    expect(Math.max(...p.valuesDb)).toBeCloseTo(0, 12);
  });
  it('disabling an element equals a zero weight, and does not mutate inputs', () => {
    const enabled = [true, true, false, true, true, true];
    const weights = [1, 1, 0, 1, 1, 1];
    const a = beamPattern({ elements: 6, spacingWavelengths: 0.5, enabled });
    const b = beamPattern({ elements: 6, spacingWavelengths: 0.5, weights });
    for (let i = 0; i < a.valuesDb.length; i++) expect(a.valuesDb[i]).toBeCloseTo(b.valuesDb[i], 12);
    expect(enabled).toEqual([true, true, false, true, true, true]);
    expect(effectiveWeights(6, { enabled }).symmetricReal).toBe(false);
    expect(effectiveWeights(6, {}).symmetricReal).toBe(true);
  });
  it('default grid is −90…90 in 0.1° steps', () => {
    const g = thetaGridDeg();
    expect(g.length).toBe(1801);
    expect(g[0]).toBe(-90);
    expect(g[1800]).toBe(90);
  });
});

describe('bad input', () => {
  it('names the argument', () => {
    expect(() => taperWeights(1, 'uniform')).toThrow(/elements/);
    expect(() => taperWeights(8, 'kaiser' as never)).toThrow(/taper.kind/);
    expect(() => chebyshevWeights(8, -3)).toThrow(/sidelobeDb/);
    expect(() => beamPattern({ elements: 8, spacingWavelengths: 0 })).toThrow(/spacingWavelengths/);
    expect(() => beamPattern({ elements: 8, spacingWavelengths: 0.5, steerDeg: 91 })).toThrow(/steerDeg/);
    expect(() => beamPattern({ elements: 8, spacingWavelengths: 0.5, gainDb: [0, 0] })).toThrow(
      /gainDb has 2 entries, expected 8/,
    );
    expect(() => beamPattern({ elements: 4, spacingWavelengths: 0.5, phaseDeg: [0, NaN, 0, 0] })).toThrow(
      /phaseDeg\[1\]/,
    );
    expect(() => beamPattern({ elements: 3, spacingWavelengths: 0.5, enabled: [false, false, false] })).toThrow(
      /every element is disabled/,
    );
    expect(() => beamPattern({ elements: 3, spacingWavelengths: 0.5, thetaDeg: [0, 100] })).toThrow(/thetaDeg\[1\]/);
    expect(() => beamPattern({ elements: 3, spacingWavelengths: 0.5, u: [2] })).toThrow(/u\[0\]/);
    expect(() => beamPattern({ elements: 2.5, spacingWavelengths: 0.5 })).toThrow(DoaInputError);
  });
});
