/**
 * The worker-thread entry of the compute pool (lib/jobs/pool.ts). Piscina
 * calls the default export with one task; progress goes into a shared
 * Int32Array cell (fraction × 1e6) that the web thread reads, so no message is
 * sent per step. Errors come back encoded (lib/jobs/compute.ts) because
 * structured cloning drops their class and fields.
 *
 * scripts/build-worker.mjs bundles this file with esbuild (dist/jobs-worker.cjs
 * for next start; a cached copy in development and tests).
 */
import { compute, encodeError, type ComputeTaskName, type ComputeTasks, type EncodedError } from './compute';

export interface WorkerTask<K extends ComputeTaskName = ComputeTaskName> {
  task: K;
  input: ComputeTasks[K]['input'];
  progress?: SharedArrayBuffer;
}

export type WorkerAnswer<K extends ComputeTaskName = ComputeTaskName> =
  { ok: true; value: ComputeTasks[K]['output'] } | { ok: false; error: EncodedError };

export default async function runTask({ task, input, progress }: WorkerTask): Promise<WorkerAnswer> {
  const cell = progress ? new Int32Array(progress) : null;
  const report = (fraction: number) => {
    if (cell) Atomics.store(cell, 0, Math.round(Math.min(1, Math.max(0, fraction)) * 1e6));
  };
  try {
    return { ok: true, value: await compute(task, input, report) };
  } catch (err) {
    return { ok: false, error: encodeError(err) };
  }
}
