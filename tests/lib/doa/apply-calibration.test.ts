/**
 * Applying a known calibration (docs/conventions.md §9): the recorded snapshots are
 * x_m = g_m·x0_m, so dividing by g_m restores the ideal array's snapshots, and every method
 * returns numpy's bearings on the ideal data (fixtures/failed-elements/generate.py,
 * apply-calibration.json) to 1e-6°. Without the division the bearings move away.
 */
import { describe, expect, it } from 'vitest';
import fixture from '@/fixtures/failed-elements/apply-calibration.json';
import { applyElementGains, complexGains } from '@/lib/doa/calibration';
import { DOA_METHODS, estimateBearings, type ComplexMatrix } from '@/lib/doa';
import { maxAbsDiff } from './helpers';

const recorded: ComplexMatrix = {
  rows: fixture.snapshots,
  cols: fixture.elements,
  re: Float64Array.from(fixture.recordedRows.re.flat()),
  im: Float64Array.from(fixture.recordedRows.im.flat()),
};
const gains = complexGains(fixture.elementStates);
const calibrated = applyElementGains(recorded, gains, 'snapshots-by-elements');

describe('estimates with a known calibration applied', () => {
  for (const method of DOA_METHODS) {
    it(`${method}: calibrated bearings equal numpy's on the ideal array within 1e-6°`, () => {
      const opts = { spacingWavelengths: fixture.spacingWavelengths, sourceCount: fixture.sourceCount, method };
      const fixed = estimateBearings({ ...opts, rows: calibrated }).bearingsDeg;
      const ideal = fixture.idealBearingsDeg[method];
      expect(maxAbsDiff(fixed, ideal)).toBeLessThan(1e-6);
      // Uncalibrated: numpy's answer on the recorded data, and it is off the ideal one.
      const raw = estimateBearings({ ...opts, rows: recorded }).bearingsDeg;
      expect(maxAbsDiff(raw, fixture.uncalibratedBearingsDeg[method])).toBeLessThan(1e-6);
      expect(maxAbsDiff(raw, ideal)).toBeGreaterThan(0.2);
    });
  }

  it('does not change the recorded matrix', () => {
    expect(recorded.re[1]).toBe(fixture.recordedRows.re[0][1]);
  });
});
