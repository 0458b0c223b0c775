import { describe, expect, it } from 'vitest';
import { REPRODUCE_TOLERANCE_DEG, compareBearings, compareRuns } from '@/lib/runs/compare';

// Consistency checks of the one run comparison (no outside reference: the rule is the product's own).
describe('run comparison with a named tolerance', () => {
  it('calls a difference up to the tolerance reproduced, and a larger one not', () => {
    const within = compareBearings('music', [-10, 20], [-10 + 0.5 * REPRODUCE_TOLERANCE_DEG, 20]);
    expect(within.reproduced).toBe(true);
    expect(within.maxAbsDifferenceDeg).toBeCloseTo(0.5 * REPRODUCE_TOLERANCE_DEG, 14);
    const beyond = compareBearings('music', [-10, 20], [-10, 20 + 10 * REPRODUCE_TOLERANCE_DEG]);
    expect(beyond.reproduced).toBe(false);
    expect(beyond.message).toMatch(/bearing 2/);
  });

  it('a different number of bearings is never reproduced', () => {
    const c = compareBearings('esprit-ls', [1, 2], [1]);
    expect(c).toMatchObject({ reproduced: false, differencesDeg: null, maxAbsDifferenceDeg: null });
  });

  it('a re-run uses the same verdict; a method missing before compares with no bearings', () => {
    const out = compareRuns(
      [{ method: 'music', bearingsDeg: [5] }],
      [
        { method: 'music', bearingsDeg: [5] },
        { method: 'bartlett', bearingsDeg: [5] },
      ],
    );
    expect(out.map((c) => [c.method, c.reproduced, c.identical])).toEqual([
      ['music', true, true],
      ['bartlett', false, false],
    ]);
    expect(out[0].maxAbsDifferenceDeg).toBe(0);
  });
});
