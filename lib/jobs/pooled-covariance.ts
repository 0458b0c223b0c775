/**
 * The sample covariance R = X·Xᴴ/N over several worker threads, bit for bit equal
 * to the sequential lib/doa sampleCovariance (docs/conventions.md §2).
 *
 * The snapshots sit in SharedArrayBuffers (no copy per thread). The chunks of the
 * fixed summation order (COVARIANCE_CHUNK = 1024 snapshots each, lib/doa/covariance.ts)
 * are split into one contiguous range per thread; each thread returns the raw sums
 * of its chunks one by one (task 'covariance.chunks', lib/jobs/compute.ts) into one
 * shared output buffer (nothing is copied back through the message port), and this
 * thread adds them in chunk order. No server-only imports: the benchmark
 * (scripts/bench.ts) drives its own Piscina pool through `run`.
 */
import type { ComplexMatrix } from '../doa';
import { covarianceChunkCount, covarianceFromChunkSums } from '../doa/covariance';
import type { CovarianceChunksInput } from './compute';

/** From this many complex values (M·N) on, an estimate splits its covariance over the pool. */
export const POOLED_COVARIANCE_MIN_VALUES = 2 ** 18;

export type CovarianceChunkRunner = (input: CovarianceChunksInput) => Promise<{ sums: Float64Array }>;

/** A copy of a matrix in SharedArrayBuffers (re and im in one buffer), for the worker threads to read. */
export function sharedMatrix(x: ComplexMatrix): ComplexMatrix {
  const n = x.rows * x.cols;
  const all = new Float64Array(new SharedArrayBuffer(16 * n));
  all.set(x.re.subarray(0, n), 0);
  all.set(x.im.subarray(0, n), n);
  return { rows: x.rows, cols: x.cols, re: all.subarray(0, n), im: all.subarray(n) };
}

/**
 * R = X·Xᴴ/N with the chunk sums computed by `run` (one call per thread, `threads`
 * contiguous chunk ranges). `x` should live in shared memory (sharedMatrix);
 * `layout` 'rows' is N × M (file layout), 'snapshots' M × N.
 */
export async function pooledSampleCovariance(
  x: ComplexMatrix,
  layout: 'rows' | 'snapshots',
  threads: number,
  run: CovarianceChunkRunner,
): Promise<ComplexMatrix> {
  const elements = layout === 'rows' ? x.cols : x.rows;
  const snapshots = layout === 'rows' ? x.rows : x.cols;
  const chunks = covarianceChunkCount(snapshots);
  const parts = Math.max(1, Math.min(Math.floor(threads), chunks));
  const p = elements + (elements % 2);
  const size = 2 * p * p;
  const buffer = takeBuffer(chunks * size);
  try {
    const all = new Float64Array(buffer, 0, chunks * size);
    const calls: Promise<{ sums: Float64Array }>[] = [];
    for (let t = 0; t < parts; t++) {
      const first = Math.round((t * chunks) / parts);
      const count = Math.round(((t + 1) * chunks) / parts) - first;
      const out = all.subarray(first * size, (first + count) * size);
      calls.push(
        run({ layout, rows: x.rows, cols: x.cols, re: x.re, im: x.im, firstChunk: first, chunkCount: count, out }),
      );
    }
    await Promise.all(calls); // each wrote its chunks into `all`
    return covarianceFromChunkSums(elements, snapshots, [all]);
  } finally {
    giveBack(buffer);
  }
}

// Output buffers kept between calls (a few at most): a fresh SharedArrayBuffer of some
// hundreds of kilobytes costs page faults in every thread that writes it. Concurrent
// calls each take their own.
const spareBuffers: SharedArrayBuffer[] = [];

function takeBuffer(values: number): SharedArrayBuffer {
  const i = spareBuffers.findIndex((b) => b.byteLength >= 8 * values);
  if (i >= 0) return spareBuffers.splice(i, 1)[0];
  return new SharedArrayBuffer(8 * values);
}

function giveBack(buffer: SharedArrayBuffer): void {
  if (spareBuffers.length >= 4) spareBuffers.shift();
  spareBuffers.push(buffer);
}
