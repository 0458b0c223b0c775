// An estimate on a large inline snapshot set through the real worker pool: the covariance
// is split over two threads (runEstimateCompute, lib/jobs/pool.ts) and the answer equals
// the in-process sequential compute exactly (bearings, eigenvalues, bounds).
import { afterAll, describe, expect, it } from 'vitest';
import { computeEstimate, type EstimateComputeInput } from '@/lib/jobs/compute';
import { closePool, runEstimateCompute } from '@/lib/jobs/pool';
import { POOLED_COVARIANCE_MIN_VALUES } from '@/lib/jobs/pooled-covariance';
import { simulateSnapshots } from '@/lib/doa/sim/simulate';

describe('estimate with the covariance over the pool', () => {
  const previous = process.env.STEERWISE_WORKERS;
  process.env.STEERWISE_WORKERS = '2';
  afterAll(async () => {
    await closePool();
    if (previous === undefined) delete process.env.STEERWISE_WORKERS;
    else process.env.STEERWISE_WORKERS = previous;
  });

  it('gives the sequential answer bit for bit (16 elements × 20 000 snapshots)', async () => {
    const x = simulateSnapshots({
      elements: 16,
      spacingWavelengths: 0.5,
      bearingsDeg: [-20, 15],
      noisePower: 1,
      snapshots: 20000,
      seed: 9,
    });
    // file layout: N × M
    const re = new Float64Array(20000 * 16);
    const im = new Float64Array(20000 * 16);
    for (let i = 0; i < 16; i++)
      for (let n = 0; n < 20000; n++) {
        re[n * 16 + i] = x.re[i * 20000 + n];
        im[n * 16 + i] = x.im[i * 20000 + n];
      }
    expect(re.length).toBeGreaterThanOrEqual(POOLED_COVARIANCE_MIN_VALUES);
    const input = (): EstimateComputeInput => ({
      source: { kind: 'matrix', rows: 20000, cols: 16, re: re.slice(), im: im.slice() },
      elements: 16,
      spacingWavelengths: 0.5,
      methods: ['esprit-ls', 'root-music'],
      options: { forwardBackward: true },
    });
    const sequential = await computeEstimate(input(), () => {});
    const pooled = await runEstimateCompute(input());
    for (let i = 0; i < 2; i++) {
      expect(pooled.results[i].bearingsDeg).toEqual(sequential.results[i].bearingsDeg);
      expect(pooled.results[i].eigenvalues).toEqual(sequential.results[i].eigenvalues);
      expect(pooled.results[i].uncertainty).toEqual(sequential.results[i].uncertainty);
    }
  }, 60_000);
});
