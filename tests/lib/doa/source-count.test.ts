// MDL and AIC (docs/conventions.md §3, Wax & Kailath 1985).
import { describe, expect, it } from 'vitest';
import { estimateSourceCount, sourceCountCriteria } from '@/lib/doa/methods/source-count';
import { DoaInputError } from '@/lib/doa/errors';

// Source: docs/references.md §6, Wax & Kailath (1985) worked example, p = 7, N = 100, as quoted
// in a public code comment and recomputed there.
const WK = [21.2359, 2.1717, 1.4279, 1.0979, 1.0544, 0.9432, 0.7324];

describe('Wax & Kailath worked example', () => {
  const c = sourceCountCriteria(WK, 100);
  it('both MDL and AIC pick k = 2', () => {
    expect(c.mdlChoice).toBe(2);
    expect(c.aicChoice).toBe(2);
    expect(estimateSourceCount(WK, 100)).toBe(2);
    expect(estimateSourceCount(WK, 100, 'aic')).toBe(2);
  });
  it('reproduces the published curves to their printed precision', () => {
    // docs/references.md §6: L, AIC, MDL rounded to 2 decimals (L_3 to 3); tolerance half a unit in the last place.
    const L = [590.41, 37.24, 11.68, 4.762, 3.4, 1.595, 0];
    const AIC = [1180.82, 100.48, 71.36, 75.52, 86.8, 93.19, 96.0];
    const MDL = [590.41, 67.17, 66.94, 80.75, 95.5, 105.21, 110.52];
    L.forEach((v, k) =>
      expect(Math.abs(c.logLikelihood[k] - v)).toBeLessThanOrEqual(k === 3 || k === 5 ? 0.0005 : 0.005),
    );
    AIC.forEach((v, k) => expect(Math.abs(c.aic[k] - v)).toBeLessThanOrEqual(0.005));
    MDL.forEach((v, k) => expect(Math.abs(c.mdl[k] - v)).toBeLessThanOrEqual(0.005));
  });
  it('matches the code-comment values AIC ≈ 1e3·[1.1808, 0.1005, 0.0714, …] (docs/references.md §6)', () => {
    [1.1808, 0.1005, 0.0714, 0.0755, 0.0868, 0.0932, 0.096].forEach((v, k) =>
      expect(Math.abs(c.aic[k] / 1000 - v)).toBeLessThanOrEqual(0.00005),
    );
  });
});

describe('criteria rules', () => {
  it('raises eigenvalues below 1e−14 × the largest to that floor (docs/conventions.md §3)', () => {
    const withZeros = sourceCountCriteria([5, 1, 0, -1e-20], 50);
    const floored = sourceCountCriteria([5, 1, 5e-14, 5e-14], 50);
    withZeros.mdl.forEach((v, k) => expect(v).toBeCloseTo(floored.mdl[k], 9));
    expect(withZeros.mdl.every(Number.isFinite)).toBe(true);
  });
  it('white noise (equal eigenvalues) gives k = 0 and L_k = 0', () => {
    const c = sourceCountCriteria([2, 2, 2, 2, 2], 1000);
    expect(c.mdlChoice).toBe(0);
    expect(c.logLikelihood.every((v) => Math.abs(v) < 1e-9)).toBe(true);
  });
  it('penalties follow the formulas: MDL − L = ½k(2p−k)ln N, AIC − 2L = 2k(2p−k)', () => {
    const c = sourceCountCriteria(WK, 100);
    for (let k = 0; k < 7; k++) {
      expect(c.mdl[k] - c.logLikelihood[k]).toBeCloseTo(0.5 * k * (14 - k) * Math.log(100), 10);
      expect(c.aic[k] - 2 * c.logLikelihood[k]).toBeCloseTo(2 * k * (14 - k), 10);
    }
  });
  it('rejects unsorted, non-finite or all-zero eigenvalues and a bad N', () => {
    expect(() => sourceCountCriteria([1, 2], 10)).toThrow(/descending/);
    expect(() => sourceCountCriteria([NaN, 1], 10)).toThrow(DoaInputError);
    expect(() => sourceCountCriteria([0, 0], 10)).toThrow(/not positive/);
    expect(() => sourceCountCriteria([2, 1], 0)).toThrow(/snapshot count 0/);
    expect(() => estimateSourceCount([2, 1], 10, 'bic' as 'mdl')).toThrow(/neither/);
  });
});
