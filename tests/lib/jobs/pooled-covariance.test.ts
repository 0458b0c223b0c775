// The covariance split over worker threads (lib/jobs/pooled-covariance.ts) equals the
// sequential sum bit for bit; here the thread calls run in-process through the same
// compute task the pool runs ('covariance.chunks', lib/jobs/compute.ts).
import { describe, expect, it } from 'vitest';
import { compute } from '@/lib/jobs/compute';
import { pooledSampleCovariance, sharedMatrix } from '@/lib/jobs/pooled-covariance';
import { sampleCovariance, sampleCovarianceFromRows } from '@/lib/doa/covariance';
import { estimateBearings } from '@/lib/doa/estimate';
import { simulateSnapshots } from '@/lib/doa/sim/simulate';
import type { ComplexMatrix } from '@/lib/doa';

function transpose(a: ComplexMatrix): ComplexMatrix {
  const out = { rows: a.cols, cols: a.rows, re: new Float64Array(a.re.length), im: new Float64Array(a.im.length) };
  for (let i = 0; i < a.rows; i++)
    for (let k = 0; k < a.cols; k++) {
      out.re[k * a.rows + i] = a.re[i * a.cols + k];
      out.im[k * a.rows + i] = a.im[i * a.cols + k];
    }
  return out;
}

describe('pooled sample covariance', () => {
  const x = simulateSnapshots({
    elements: 9,
    spacingWavelengths: 0.5,
    bearingsDeg: [-20, 15],
    noisePower: 1,
    snapshots: 20000,
    seed: 5,
  });
  const rows = transpose(x);
  const run = (input: Parameters<typeof compute<'covariance.chunks'>>[1]) =>
    compute('covariance.chunks', input, () => {});

  it('equals the sequential result bit for bit for 1 to 6 threads, in both layouts', async () => {
    const reference = sampleCovarianceFromRows(rows);
    expect(sampleCovariance(x).re).toEqual(reference.re);
    for (const threads of [1, 2, 3, 4, 6]) {
      const fromRows = await pooledSampleCovariance(sharedMatrix(rows), 'rows', threads, run);
      expect(fromRows.re).toEqual(reference.re);
      expect(fromRows.im).toEqual(reference.im);
      const fromSnapshots = await pooledSampleCovariance(sharedMatrix(x), 'snapshots', threads, run);
      expect(fromSnapshots.re).toEqual(reference.re);
      expect(fromSnapshots.im).toEqual(reference.im);
    }
  });

  it('gives estimateBearings the same answer as its own covariance', async () => {
    const sample = await pooledSampleCovariance(sharedMatrix(rows), 'rows', 2, run);
    for (const method of ['esprit-ls', 'music', 'root-music'] as const) {
      const own = estimateBearings({ rows, spacingWavelengths: 0.5, method, sourceCount: 2 });
      const given = estimateBearings({
        rows,
        spacingWavelengths: 0.5,
        method,
        sourceCount: 2,
        sampleCovariance: sample,
      });
      expect(given.bearingsDeg).toEqual(own.bearingsDeg);
      expect(given.eigenvalues).toEqual(own.eigenvalues);
    }
    expect(() =>
      estimateBearings({
        rows,
        spacingWavelengths: 0.5,
        method: 'music',
        sampleCovariance: { rows: 2, cols: 2, re: new Float64Array(4), im: new Float64Array(4) },
      }),
    ).toThrow(/sampleCovariance is 2 × 2, not 9 × 9/);
  });
});

describe('the warm-up task a pool thread runs at start', () => {
  it('runs the covariance and EVD paths and names the kernel', async () => {
    const answer = await compute('warm-up', { rounds: 2 }, () => {});
    // Node 20 has WebAssembly SIMD, so the kernel is the compiled one (covariance-kernel.ts).
    expect(answer.kernel).toBe('wasm');
    expect(answer.ms).toBeGreaterThan(0);
  });
});
