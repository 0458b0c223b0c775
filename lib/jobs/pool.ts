import 'server-only';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { Piscina } from 'piscina';
import { DatasetError } from '../datasets';
import { covarianceChunkCount } from '../doa/covariance';
import { decodeError, type ComputeTaskName, type ComputeTasks, type EstimateComputeInput } from './compute';
import { POOLED_COVARIANCE_MIN_VALUES, pooledSampleCovariance, sharedMatrix } from './pooled-covariance';
import type { WorkerAnswer, WorkerTask } from './worker';

/**
 * The compute pool: piscina worker threads, as many as the machine's cores
 * (STEERWISE_WORKERS overrides), running lib/jobs/worker.ts bundled by
 * esbuild (scripts/build-worker.mjs). The web thread only validates, stores,
 * enqueues and answers.
 *
 * Which file the threads load:
 * - STEERWISE_WORKER_FILE when set;
 * - under NODE_ENV=production (next start), dist/jobs-worker.cjs, which
 *   `npm run build` writes before next build; a missing bundle is an error
 *   naming the command;
 * - otherwise (next dev, vitest, tsx scripts) a bundle built on first use into
 *   node_modules/.cache/steerwise/, so every setting runs the same bundled code.
 */
export async function workerFile(): Promise<string> {
  if (process.env.STEERWISE_WORKER_FILE)
    return path.resolve(/*turbopackIgnore: true*/ process.env.STEERWISE_WORKER_FILE);
  const root = process.cwd();
  if (process.env.NODE_ENV === 'production') {
    const bundled = path.join(/*turbopackIgnore: true*/ root, 'dist', 'jobs-worker.cjs');
    if (!fs.existsSync(bundled)) {
      throw new Error(
        `The compute worker bundle ${bundled} is missing; run "npm run build" (it runs build:worker before next build).`,
      );
    }
    return bundled;
  }
  // Built per process into a temporary name, then renamed over one shared file (atomic), so
  // parallel test processes never see a half-written bundle and nothing accumulates.
  const dir = path.join(/*turbopackIgnore: true*/ root, 'node_modules', '.cache', 'steerwise');
  const out = path.join(dir, 'jobs-worker.cjs');
  const temp = path.join(dir, `jobs-worker.${process.pid}.tmp.cjs`);
  const script = pathToFileURL(path.join(/*turbopackIgnore: true*/ root, 'scripts', 'build-worker.mjs')).href;
  const { buildWorker } = (await import(/* webpackIgnore: true */ /* turbopackIgnore: true */ script)) as {
    buildWorker: (file: string, options: { inlineSourceMap: boolean }) => Promise<string>;
  };
  await buildWorker(temp, { inlineSourceMap: true });
  fs.renameSync(temp, out);
  return out;
}

export function poolSize(): number {
  const fromEnv = Number(process.env.STEERWISE_WORKERS);
  if (Number.isInteger(fromEnv) && fromEnv > 0) return fromEnv;
  return Math.max(1, os.availableParallelism());
}

type PoolHolder = { pool?: Promise<Piscina> };
const holder = ((globalThis as Record<string, unknown>).__steerwisePool ??= {}) as PoolHolder;

function pool(): Promise<Piscina> {
  if (!holder.pool) {
    const size = poolSize();
    const made = workerFile().then(
      (filename) =>
        new Piscina({
          filename,
          minThreads: size,
          maxThreads: size,
          idleTimeout: 60_000,
          // The engine's typed arrays for a 200 MB dataset need room beyond V8's default young/old sizes.
          resourceLimits: { maxOldGenerationSizeMb: 2048 },
        }),
    );
    made.catch(() => {
      if (holder.pool === made) holder.pool = undefined;
    });
    holder.pool = made;
  }
  return holder.pool;
}

/**
 * Starts the pool's threads now (server start), so that the first job does not wait for
 * them to load the worker bundle, and gives each a short warm-up task (lib/jobs/compute.ts
 * warmUp: the covariance and EVD paths compiled by the optimising tiers, about 0.1 s). One
 * task per thread at once: an idle pool hands them to different threads. A failure is left
 * to the first runCompute to report.
 */
export function warmPool(): void {
  pool()
    .then((p) =>
      Promise.all(
        Array.from({ length: poolSize() }, () =>
          p.run({ task: 'warm-up', input: {}, progress: new SharedArrayBuffer(4) }),
        ),
      ),
    )
    .catch(() => {});
}

export interface ComputeOptions {
  signal?: AbortSignal;
  onProgress?: (fraction: number) => void;
  /** Buffers moved (not copied) to the worker; they are unusable here afterwards. */
  transferList?: ArrayBuffer[];
}

/** Runs one compute task on the pool; rejects with the task's own error class (see encodeError). */
export async function runCompute<K extends ComputeTaskName>(
  task: K,
  input: ComputeTasks[K]['input'],
  { signal, onProgress, transferList }: ComputeOptions = {},
): Promise<ComputeTasks[K]['output']> {
  const progress = new SharedArrayBuffer(4);
  const cell = new Int32Array(progress);
  let last = -1;
  const poll = onProgress
    ? setInterval(() => {
        const v = Atomics.load(cell, 0);
        if (v !== last) {
          last = v;
          onProgress(v / 1e6);
        }
      }, 200)
    : null;
  poll?.unref();
  try {
    const message: WorkerTask<K> = { task, input, progress };
    const answer = (await (
      await pool()
    ).run(message, { ...(signal ? { signal } : {}), ...(transferList ? { transferList } : {}) })) as WorkerAnswer<K>;
    if (!answer.ok) throw decodeError(answer.error);
    return answer.value;
  } finally {
    if (poll) clearInterval(poll);
  }
}

/**
 * The estimate task. Large inline or stored snapshot sets (M·N ≥ 2^18 values, more than
 * one 1024-snapshot chunk, a pool of two or more threads) first get their sample
 * covariance from every pool thread at once (lib/jobs/pooled-covariance.ts, the same R bit
 * for bit as the sequential sum); the estimate then runs on it. Dataset files are parsed
 * inside the estimate task as before (the parse dominates there).
 */
export async function runEstimateCompute(
  input: EstimateComputeInput,
  options: ComputeOptions = {},
): Promise<ComputeTasks['estimate']['output']> {
  const src = input.source;
  const threads = poolSize();
  if (
    threads > 1 &&
    // The pooled sum is of the stored snapshots: not for a run that divides them by element gains
    // first, nor for one whose methods each take their own elements.
    !input.calibration &&
    !input.enabledIndices &&
    (src.kind === 'matrix' || src.kind === 'raw') &&
    src.rows * src.cols >= POOLED_COVARIANCE_MIN_VALUES &&
    covarianceChunkCount(src.rows) > 1
  ) {
    const rows = src.kind === 'matrix' ? sharedMatrix(src) : await sharedRawSnapshots(src);
    const sample = await pooledSampleCovariance(rows, 'rows', threads, (chunk) =>
      runCompute('covariance.chunks', chunk, options.signal ? { signal: options.signal } : {}),
    );
    options.onProgress?.(0.3);
    return runCompute(
      'estimate',
      { ...input, source: { kind: 'matrix', ...rows }, sampleCovariance: sample },
      {
        ...(options.signal ? { signal: options.signal } : {}),
        ...(options.onProgress ? { onProgress: options.onProgress } : {}),
      },
    );
  }
  return runCompute('estimate', input, options);
}

/** A stored snapshot set (N·M re values, then N·M im values, float64 LE) read straight into shared memory. */
async function sharedRawSnapshots(src: { path: string; rows: number; cols: number }) {
  const n = src.rows * src.cols;
  const stat = await fs.promises.stat(src.path);
  if (stat.size !== 16 * n) {
    throw new DatasetError(422, 'corrupt', `the stored snapshot file holds ${stat.size} bytes, expected ${16 * n}`);
  }
  const shared = new SharedArrayBuffer(16 * n);
  const handle = await fs.promises.open(src.path, 'r');
  try {
    const bytes = new Uint8Array(shared);
    let at = 0;
    while (at < bytes.length) {
      const { bytesRead } = await handle.read(bytes, at, bytes.length - at, at);
      if (bytesRead === 0) throw new DatasetError(422, 'corrupt', `the stored snapshot file ended after ${at} bytes`);
      at += bytesRead;
    }
  } finally {
    await handle.close();
  }
  const all = new Float64Array(shared);
  return { rows: src.rows, cols: src.cols, re: all.subarray(0, n), im: all.subarray(n) };
}

/** Stops the pool's threads (tests, shutdown). */
export async function closePool(): Promise<void> {
  const p = holder.pool;
  holder.pool = undefined;
  if (p) await (await p).destroy();
}
