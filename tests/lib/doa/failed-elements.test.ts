/**
 * A 16-element line with elements 5 and 14 disabled (fixtures/failed-elements/generate.py, numpy).
 * Spectral methods run on the 14 enabled elements at their true positions; ESPRIT and root-MUSIC on
 * the longest contiguous run (elements 6–13). The reference is numpy on the same snapshots.
 */
import { describe, expect, it } from 'vitest';
import fixture from '@/fixtures/failed-elements/failed-elements.json';
import {
  estimateBearings,
  longestContiguousRun,
  selectElements,
  stochasticCrb,
  describeElements,
  type ComplexMatrix,
  type DoaMethod,
} from '@/lib/doa';
import { maxAbsDiff } from './helpers';

function rowsOf(x: { re: number[][]; im: number[][] }): ComplexMatrix {
  const n = x.re.length;
  const m = x.re[0].length;
  return { rows: n, cols: m, re: Float64Array.from(x.re.flat()), im: Float64Array.from(x.im.flat()) };
}

const rows = rowsOf(fixture.rows);
const base = {
  rows,
  spacingWavelengths: fixture.spacingWavelengths,
  sourceCount: fixture.sourceCount,
  elementIndices: fixture.enabled,
};

describe('element selection', () => {
  it('keeps every enabled element for the spectra and the longest run for ESPRIT and root-MUSIC', () => {
    expect(longestContiguousRun(fixture.enabled)).toEqual(fixture.longestRun);
    expect(selectElements('music', fixture.enabled, 16).kind).toBe('enabled-true-positions');
    expect(selectElements('esprit-ls', fixture.enabled, 16).indices).toEqual(fixture.longestRun);
    // Smoothing needs a uniform line, so the spectra fall back to the run too.
    expect(selectElements('music', fixture.enabled, 16, { forwardBackward: true }).kind).toBe('longest-contiguous-run');
    expect(selectElements('music', [0, 1, 2], 3).kind).toBe('all');
    expect(longestContiguousRun([0, 1, 3, 4])).toEqual([0, 1]); // a tie goes to the run nearest element 0
    expect(describeElements([0, 1, 2, 5, 7, 8])).toBe('1–3, 6, 8, 9');
  });

  it('refuses bad index lists and lines with no two adjacent enabled elements', () => {
    expect(() => selectElements('music', [3, 2], 16)).toThrow(/ascending/);
    expect(() => selectElements('music', [0, 16], 16)).toThrow(/from 0 to 15/);
    expect(() => selectElements('music', [5], 16)).toThrow(/at least 2/);
    expect(() => selectElements('esprit-ls', [0, 2, 4], 5)).toThrow(/adjacent/);
  });
});

describe('spectral methods on the enabled elements at their true positions (numpy reference)', () => {
  for (const method of ['music', 'bartlett', 'mvdr'] as const) {
    it(`${method}: the same grid bearings, and the spectrum to 1e-8 dB`, () => {
      const res = estimateBearings({ ...base, method, includeSpectrum: true });
      const ref = fixture.truePositions[method];
      // Grid peaks: identical grid values (docs/conventions.md §4).
      expect(res.bearingsDeg).toEqual(ref.bearingsDeg);
      const every100 = res.spectrum!.valuesDb.filter((_, i) => i % 100 === 0);
      expect(maxAbsDiff(every100, ref.spectrumDbEvery100)).toBeLessThan(1e-8);
      expect(res.elementSelection).toEqual({
        kind: 'enabled-true-positions',
        indices: fixture.enabled,
        lineElements: 16,
      });
      expect(res.effectiveElements).toBe(14);
      expect(maxAbsDiff(res.eigenvalues, fixture.enabledEigenvalues)).toBeLessThan(
        1e-12 * fixture.enabledEigenvalues[0],
      );
      expect(res.warnings[0].code).toBe('element-subset');
      expect(res.warnings[0].message).toContain('14 enabled elements at their true positions');
      expect(res.warnings[0].message).toContain('elements 5, 14 disabled');
    });
  }

  it('MDL on the enabled covariance picks the numpy choice', () => {
    const { sourceCount: _k, ...rest } = base;
    void _k;
    const res = estimateBearings({ ...rest, method: 'music' });
    expect(res.sourceCount).toBe(fixture.enabledMdlChoice);
  });

  it('the disabled channels do not reach the answer', () => {
    const garbled: ComplexMatrix = { ...rows, re: rows.re.slice(), im: rows.im.slice() };
    for (let r = 0; r < rows.rows; r++) for (const c of fixture.disabled) garbled.re[r * 16 + c] = 1e6 * (r % 7);
    const a = estimateBearings({ ...base, method: 'mvdr' });
    const b = estimateBearings({ ...base, rows: garbled, method: 'mvdr' });
    expect(b.bearingsDeg).toEqual(a.bearingsDeg);
  });
});

describe('ESPRIT and root-MUSIC on the longest contiguous run (numpy reference)', () => {
  const methods: DoaMethod[] = ['esprit-ls', 'esprit-tls', 'esprit-unitary', 'root-music'];
  for (const method of methods) {
    it(`${method}: within 1e-6° of numpy`, () => {
      const res = estimateBearings({ ...base, method });
      const ref = fixture.longestRunBearingsDeg[method as keyof typeof fixture.longestRunBearingsDeg];
      expect(maxAbsDiff(res.bearingsDeg, ref)).toBeLessThan(1e-6);
      expect(res.elementSelection?.kind).toBe('longest-contiguous-run');
      expect(res.elementSelection?.indices).toEqual(fixture.longestRun);
      expect(maxAbsDiff(res.eigenvalues, fixture.runEigenvalues)).toBeLessThan(1e-12 * fixture.runEigenvalues[0]);
      expect(res.warnings[0].message).toContain('longest contiguous run of enabled elements, 6–13 (8 of 16');
    });
  }
});

describe('CRB on the enabled positions (numpy, M × M formula of docs/conventions.md §5)', () => {
  const input = {
    elements: 16,
    spacingWavelengths: fixture.spacingWavelengths,
    bearingsDeg: fixture.trueBearingsDeg,
    sourcePowers: fixture.sourcePowers,
    noisePower: fixture.noisePower,
    snapshots: fixture.snapshots,
  };
  it('matches for the enabled elements, the run and the full line to 1e-9 relative', () => {
    const cases: [number[] | undefined, number[]][] = [
      [fixture.enabled, fixture.crbStdDeg.enabled],
      [fixture.longestRun, fixture.crbStdDeg.longestRun],
      [undefined, fixture.crbStdDeg.fullLine],
    ];
    for (const [indices, ref] of cases) {
      const got = stochasticCrb({ ...input, ...(indices ? { elementIndices: indices } : {}) }).stdDeg;
      for (let i = 0; i < ref.length; i++) expect(Math.abs(got[i] - ref[i]) / ref[i]).toBeLessThan(1e-9);
    }
  });

  it('losing two elements costs little; the 8-element run costs about a factor 3', () => {
    const { enabled, longestRun, fullLine } = fixture.crbStdDeg;
    for (let i = 0; i < 3; i++) {
      expect(enabled[i] / fullLine[i]).toBeGreaterThan(1);
      expect(enabled[i] / fullLine[i]).toBeLessThan(1.1);
      expect(longestRun[i] / enabled[i]).toBeGreaterThan(2.5);
    }
  });
});
