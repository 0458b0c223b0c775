import { describe, expect, it } from 'vitest';
import { spreadLabels } from '@/lib/designer/label-layout';

// Invariants of the label spreading used by the separation chart: labels stay
// in the order of their points, at least minGap apart, and unmoved when they do not collide.
function checkInvariants(ys: number[], out: number[], minGap: number) {
  const order = ys.map((y, i) => ({ y, i })).sort((a, b) => a.y - b.y || a.i - b.i);
  for (let k = 1; k < order.length; k++)
    expect(out[order[k].i] - out[order[k - 1].i]).toBeGreaterThanOrEqual(minGap - 1e-9);
}

describe('spreadLabels', () => {
  it('leaves labels that do not collide where their points are', () => {
    expect(spreadLabels([40, 100, 160], { minGap: 12 })).toEqual([40, 100, 160]);
  });

  it('moves a colliding label down by the gap (S1–S3 and S2–S3 nearly at the same height)', () => {
    const ys = [120.4, 118.9, 60];
    const out = spreadLabels(ys, { minGap: 12, top: 20, bottom: 270 });
    expect(out[1]).toBe(118.9); // the upper one of the close pair stays
    expect(out[0]).toBeCloseTo(130.9, 12);
    expect(out[2]).toBe(60);
    checkInvariants(ys, out, 12);
  });

  it('keeps input order for equal heights and spreads a cluster of three', () => {
    const out = spreadLabels([50, 50, 50], { minGap: 12 });
    expect(out).toEqual([50, 62, 74]);
  });

  it('moves a cluster at the bottom back up inside the plot', () => {
    const ys = [268, 269, 270];
    const out = spreadLabels(ys, { minGap: 12, top: 20, bottom: 270 });
    expect(Math.max(...out)).toBe(270);
    expect(out).toEqual([246, 258, 270]);
    checkInvariants(ys, out, 12);
  });

  it('does not mutate its input; empty and single inputs', () => {
    const ys = [10, 11];
    spreadLabels(ys, { minGap: 12 });
    expect(ys).toEqual([10, 11]);
    expect(spreadLabels([], { minGap: 12 })).toEqual([]);
    expect(spreadLabels([5], { minGap: 12, top: 20 })).toEqual([20]);
    expect(() => spreadLabels([1], { minGap: Number.NaN })).toThrow(/minGap/);
  });
});
