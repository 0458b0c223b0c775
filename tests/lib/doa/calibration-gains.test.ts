import { describe, expect, it } from 'vitest';
import { applyElementGains, complexGains, gainStates, isUnitGain } from '@/lib/doa/calibration';

// Consistency checks of the gain convention of docs/conventions.md §9: g = 10^(dB/20)·e^{+jφ}.
describe('element gains', () => {
  it('turns 6.0206 dB and 90° into 2j (definition of the decibel as 20·log10 of amplitude, common practice)', () => {
    const g = complexGains([{ gainDb: 20 * Math.log10(2), phaseDeg: 90 }]);
    expect(g.re[0]).toBeCloseTo(0, 12);
    expect(g.im[0]).toBeCloseTo(2, 12);
    const [s] = gainStates(g);
    expect(s.gainDb).toBeCloseTo(6.0206, 4);
    expect(s.phaseDeg).toBeCloseTo(90, 10);
  });

  it('undoes a known gain on either layout', () => {
    const states = [
      { gainDb: 0, phaseDeg: 0 },
      { gainDb: -1.5, phaseDeg: 17 },
      { gainDb: 2, phaseDeg: -160 },
    ];
    const g = complexGains(states);
    // Clean data: element m, snapshot n = (m + 1) + j·n.
    const m = 3;
    const n = 4;
    const cleanRe = new Float64Array(m * n);
    const cleanIm = new Float64Array(m * n);
    const dirtyRe = new Float64Array(m * n);
    const dirtyIm = new Float64Array(m * n);
    for (let r = 0; r < m; r++)
      for (let c = 0; c < n; c++) {
        const i = r * n + c;
        cleanRe[i] = r + 1;
        cleanIm[i] = c;
        dirtyRe[i] = g.re[r] * cleanRe[i] - g.im[r] * cleanIm[i];
        dirtyIm[i] = g.re[r] * cleanIm[i] + g.im[r] * cleanRe[i];
      }
    const fixed = applyElementGains({ rows: m, cols: n, re: dirtyRe, im: dirtyIm }, g, 'elements-by-snapshots');
    for (let i = 0; i < m * n; i++) {
      expect(fixed.re[i]).toBeCloseTo(cleanRe[i], 12);
      expect(fixed.im[i]).toBeCloseTo(cleanIm[i], 12);
    }
    // The same data transposed (N × M) gives the transposed answer.
    const tRe = new Float64Array(m * n);
    const tIm = new Float64Array(m * n);
    for (let r = 0; r < m; r++)
      for (let c = 0; c < n; c++) {
        tRe[c * m + r] = dirtyRe[r * n + c];
        tIm[c * m + r] = dirtyIm[r * n + c];
      }
    const fixedT = applyElementGains({ rows: n, cols: m, re: tRe, im: tIm }, g, 'snapshots-by-elements');
    for (let r = 0; r < m; r++)
      for (let c = 0; c < n; c++) {
        expect(fixedT.re[c * m + r]).toBeCloseTo(cleanRe[r * n + c], 12);
        expect(fixedT.im[c * m + r]).toBeCloseTo(cleanIm[r * n + c], 12);
      }
    expect(isUnitGain(states)).toBe(false);
    expect(isUnitGain([{ gainDb: 0, phaseDeg: 0 }])).toBe(true);
  });

  it('refuses a mismatched element count and a zero gain', () => {
    const x = { rows: 2, cols: 3, re: new Float64Array(6), im: new Float64Array(6) };
    expect(() => applyElementGains(x, complexGains([{ gainDb: 0, phaseDeg: 0 }]), 'elements-by-snapshots')).toThrow(
      /2 elements but the calibration has 1/,
    );
    expect(() =>
      applyElementGains(x, { re: new Float64Array([1, 0]), im: new Float64Array(2) }, 'elements-by-snapshots'),
    ).toThrow(/element 2/);
  });
});
