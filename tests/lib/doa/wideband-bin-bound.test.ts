import { describe, expect, it } from 'vitest';
import { zeros, type ComplexMatrix } from '@/lib/doa/linalg/complex';
import { SeededRandom } from '@/lib/doa/sim/simulate';
import { binFisherInformation, estimatePowers } from '@/lib/doa/wideband';
import { BinBoundWorkspace } from '@/lib/doa/wideband/bin-bound';

/** A sample covariance of T snapshots: sources at the given bearings (powers p) plus white noise σ² = 1. */
function covariance(
  rng: SeededRandom,
  m: number,
  d: number,
  bearingsDeg: number[],
  p: number[],
  t: number,
): ComplexMatrix {
  const r = zeros(m, m);
  const xr = new Float64Array(m);
  const xi = new Float64Array(m);
  for (let n = 0; n < t; n++) {
    for (let e = 0; e < m; e++) {
      xr[e] = Math.SQRT1_2 * rng.normal();
      xi[e] = Math.SQRT1_2 * rng.normal();
    }
    bearingsDeg.forEach((th, s) => {
      const sr = Math.sqrt(p[s] / 2) * rng.normal();
      const si = Math.sqrt(p[s] / 2) * rng.normal();
      const mu = 2 * Math.PI * d * Math.sin((th * Math.PI) / 180);
      for (let e = 0; e < m; e++) {
        const c = Math.cos(mu * e);
        const z = Math.sin(mu * e);
        xr[e] += sr * c - si * z;
        xi[e] += sr * z + si * c;
      }
    });
    for (let i = 0; i < m; i++) {
      for (let j = 0; j < m; j++) {
        r.re[i * m + j] += (xr[i] * xr[j] + xi[i] * xi[j]) / t;
        r.im[i * m + j] += (xi[i] * xr[j] - xr[i] * xi[j]) / t;
      }
    }
  }
  return r;
}

describe('per-bin powers and Fisher information on reused buffers (wideband/bin-bound.ts)', () => {
  it('equal estimatePowers then binFisherInformation to rounding (consistency check)', () => {
    const rng = new SeededRandom(99);
    const ws = new BinBoundWorkspace(16, 16);
    for (const [m, d, bearings, powers, noise] of [
      [16, 0.37, [-20, 14], [3, 1], 1.1],
      [16, 0.5, [-40.2, 35.5], [0.2, 5], 0.9],
      [16, 0.25, [5, 9, 60], [2, 2, 0.5], 1],
      [8, 0.45, [0], [10], 1],
      [16, 0.3, [-3, 3], [0.01, 0.01], 1.4], // weak sources: some powers clip to zero
    ] as [number, number, number[], number[], number][]) {
      const r = covariance(rng, m, d, bearings, powers, 30);
      const local = m === 16 ? ws : new BinBoundWorkspace(m, 4);
      // Evaluate near (not at) the true bearings, as at a block's wideband peaks.
      const peaks = bearings.map((b, i) => b + 0.3 * (i + 1));
      const theta = peaks.map((b) => (b * Math.PI) / 180);
      const refPowers = estimatePowers(r, noise, m, d, peaks);
      const refFisher = refPowers.some((p) => p > 0) ? binFisherInformation(m, d, theta, refPowers, noise, 30) : null;
      const ok = local.evaluate(r, noise, d, theta, 30);
      expect(ok).toBe(refFisher !== null);
      const k = peaks.length;
      for (let s = 0; s < k; s++) expect(local.powers[s]).toBeCloseTo(refPowers[s], 10);
      if (refFisher) {
        const scale = Math.max(...Array.from(refFisher, Math.abs));
        for (let i = 0; i < k * k; i++) expect(Math.abs(local.fisher[i] - refFisher[i])).toBeLessThan(1e-10 * scale);
      }
    }
  });

  it('an aliased pair (d = 1, sin θ = ±0.5: the same steering vector) gives no information, as binFisherInformation', () => {
    const ws = new BinBoundWorkspace(6, 2);
    const r = zeros(6, 6);
    for (let i = 0; i < 6; i++) r.re[i * 6 + i] = 2;
    const theta = [Math.asin(-0.5), Math.asin(0.5)];
    expect(binFisherInformation(6, 1, theta, [1, 1], 1, 20)).toBeNull();
    expect(ws.evaluate(r, 1, 1, theta, 20)).toBe(false);
  });
});
