/**
 * The known-bearings fit against an independent numpy implementation
 * (fixtures/calibration/generate.py: numpy.linalg.eigh, the closed form Q⁻¹w/(wᵀQ⁻¹w);
 * docs/references.md §12), on the same seeded rows, to 1e−8 relative.
 */
import { describe, expect, it } from 'vitest';
import reference from '@/fixtures/calibration/known-bearings.json';
import { fitSubset, prepareReferences } from '@/lib/doa/calibration';

describe('known-bearings fit: numpy reference', () => {
  for (const c of reference.cases) {
    it(c.name, () => {
      const refs = c.references.map((r) => ({
        rows: {
          rows: r.rows.n,
          cols: c.elements,
          re: Float64Array.from(r.rows.re),
          im: Float64Array.from(r.rows.im),
        },
        bearingsDeg: r.bearingsDeg,
      }));
      const prepared = prepareReferences(refs, { spacingWavelengths: c.spacingWavelengths });
      const fit = fitSubset(
        prepared,
        prepared.map((_, i) => i),
      );
      for (let i = 0; i < c.elements; i++) {
        const scale = Math.hypot(c.gains.re[i], c.gains.im[i]);
        expect(Math.abs(fit.gains.re[i] - c.gains.re[i]), `re ${i}`).toBeLessThanOrEqual(1e-8 * scale);
        expect(Math.abs(fit.gains.im[i] - c.gains.im[i]), `im ${i}`).toBeLessThanOrEqual(1e-8 * scale);
        expect(fit.states[i].gainDb).toBeCloseTo(c.gainDb[i], 7);
        expect(fit.states[i].phaseDeg).toBeCloseTo(c.phaseDeg[i], 6);
      }
    });
  }
});
