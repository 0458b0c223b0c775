/**
 * The compute of every job kind, as plain functions without I/O other than
 * reading the input file they are pointed at. They run inside the worker
 * threads (lib/jobs/worker.ts) and never touch the database, Next or React.
 *
 * Layouts: snapshots are N × M row-major, split re/im (docs/conventions.md §2).
 * Large inputs travel as a file path (a stored dataset) or as transferred
 * Float64Array buffers (inline snapshots), never as nested JSON arrays.
 */
import { DatasetError, parseSnapshotFile, type ParseOptions, type SnapshotFormat } from '../datasets';
import { DoaInputError, DoaNumericalError, type ComplexMatrix, type DoaMethod } from '../doa';
import { WidebandInputError } from '../doa/wideband/plan';
import { applyElementGains, complexGains, type ElementGainState } from '../doa/calibration';
import { COVARIANCE_CHUNK, covarianceChunkSums, sampleCovarianceFromRows } from '../doa/covariance';
import { hermitianEigen } from '../doa/linalg/hermitian-eigen';
import { transpose } from '../doa/linalg/complex';
import { simulateSnapshots } from '../doa/sim/simulate';
import { covarianceKernelInUse } from '../doa/wasm/covariance-kernel';
import { summarise, type DatasetSummary } from '../storage/summary';
import {
  runStudy,
  StudyAbortedError,
  StudyBudgetError,
  StudyInputError,
  type StudyResult,
  type StudySpec,
} from '../studies/monte-carlo';
import { runMethod, usedCovariance, type MethodResult, type RunOptions } from './estimate-run';
import { computeBtrBlocks, type BtrBlocksInput, type BtrBlocksOutput } from './btr-blocks';
import { parseEstimateRequest, type EstimateRequestInput, type EstimateRequestOutput } from './estimate-request';
import {
  calibrate,
  CalibrationInputError,
  type CalibrationMethod,
  type CalibrationResult,
} from '../doa/calibration/report';

/** Where an estimate's snapshots come from. */
export type SnapshotSource =
  | {
      kind: 'file';
      path: string;
      format: SnapshotFormat;
      fileName: string;
      maxBytes: number;
      parseOptions?: Omit<ParseOptions, 'path' | 'onProgress' | 'signal'>;
    }
  | { kind: 'matrix'; rows: number; cols: number; re: Float64Array; im: Float64Array }
  /** A content-addressed snapshot file: N·M float64 little-endian re values, then N·M im values. */
  | { kind: 'raw'; path: string; rows: number; cols: number; sha256: string };

export interface EstimateComputeInput {
  source: SnapshotSource;
  elements: number;
  spacingWavelengths: number;
  methods: DoaMethod[];
  options: RunOptions;
  /** Element gain and phase to divide out before the covariance (docs/conventions.md §9); absent: none. */
  calibration?: ElementGainState[];
  /** Enabled elements, 0-based, ascending, on a line with disabled elements; absent: all. */
  enabledIndices?: number[];
  /** X·Xᴴ/N of the source's snapshots when computed beforehand over the pool (lib/jobs/pooled-covariance.ts). */
  sampleCovariance?: ComplexMatrix;
}

/** Raw sums of a range of covariance chunks (lib/doa covarianceChunkSums) of snapshots in shared memory. */
export interface CovarianceChunksInput {
  layout: 'rows' | 'snapshots';
  rows: number;
  cols: number;
  /** Usually views of SharedArrayBuffers, so no copy is made per task. */
  re: Float64Array;
  im: Float64Array;
  firstChunk: number;
  chunkCount: number;
  /** Where to write the sums (a view of a SharedArrayBuffer, exactly their size); else a new array is returned. */
  out?: Float64Array;
}

export interface DatasetParseInput {
  path: string;
  fileName: string;
  format: SnapshotFormat;
  maxBytes: number;
  parseOptions?: Omit<ParseOptions, 'path' | 'onProgress' | 'signal'>;
}

export interface DatasetParseOutput {
  format: SnapshotFormat;
  elements: number;
  snapshots: number;
  sampleRate?: number;
  details: Record<string, unknown>;
  summary: DatasetSummary;
}

/** A calibration's references (stored datasets, parsed at the analysis frequency) and the fit. */
export interface CalibrationComputeInput {
  references: { source: SnapshotSource; bearingsDeg: number[] }[];
  spacingWavelengths: number;
  method: CalibrationMethod;
}

export interface ComputeTasks {
  estimate: { input: EstimateComputeInput; output: { results: MethodResult[] } };
  calibration: { input: CalibrationComputeInput; output: CalibrationResult };
  study: { input: StudySpec; output: StudyResult };
  'dataset.parse': { input: DatasetParseInput; output: DatasetParseOutput };
  'btr.blocks': { input: BtrBlocksInput; output: BtrBlocksOutput };
  'covariance.chunks': { input: CovarianceChunksInput; output: { sums: Float64Array } };
  'estimate.request': { input: EstimateRequestInput; output: EstimateRequestOutput };
  'warm-up': { input: { rounds?: number }; output: { kernel: 'wasm' | 'js'; ms: number } };
}
export type ComputeTaskName = keyof ComputeTasks;

type Report = (fraction: number) => void;

async function loadRows(source: SnapshotSource, report: Report, share: number): Promise<ComplexMatrix> {
  if (source.kind === 'matrix') return { rows: source.rows, cols: source.cols, re: source.re, im: source.im };
  if (source.kind === 'raw') {
    const { readFile } = await import('node:fs/promises');
    const bytes = await readFile(source.path);
    const n = source.rows * source.cols;
    if (bytes.byteLength !== 16 * n) {
      throw new DatasetError(
        422,
        'corrupt',
        `the stored snapshot file holds ${bytes.byteLength} bytes, expected ${16 * n}`,
      );
    }
    const all = new Float64Array(bytes.buffer, bytes.byteOffset, 2 * n).slice();
    return { rows: source.rows, cols: source.cols, re: all.subarray(0, n), im: all.subarray(n) };
  }
  const parsed = await parseSnapshotFile({
    path: source.path,
    format: source.format,
    fileName: source.fileName,
    maxBytes: source.maxBytes,
    ...(source.parseOptions ?? {}),
    onProgress: ({ bytesRead, totalBytes }) => report((share * bytesRead) / Math.max(1, totalBytes)),
  });
  return { rows: parsed.snapshots, cols: parsed.elements, re: parsed.re, im: parsed.im };
}

/** One estimate run: every method on the same snapshots (lib/jobs/estimate-run.ts). */
export async function computeEstimate(
  input: EstimateComputeInput,
  report: Report,
): Promise<{ results: MethodResult[] }> {
  const loaded = await loadRows(input.source, report, 0.3);
  const rows = input.calibration
    ? applyElementGains(loaded, complexGains(input.calibration), 'snapshots-by-elements')
    : loaded;
  report(0.3);
  const subset =
    input.enabledIndices && input.enabledIndices.length < input.elements ? input.enabledIndices : undefined;
  // X·Xᴴ/N once for every method (given when the pool computed it; the same value bit for bit). The
  // pooled sum is of the stored snapshots, so it applies only when no calibration divides them first;
  // a line with disabled elements gives each method its own elements instead.
  const pooled = input.calibration ? undefined : input.sampleCovariance;
  const sample = subset ? undefined : (pooled ?? sampleCovarianceFromRows(rows));
  const covariance = sample ? usedCovariance(rows, input.options, sample) : undefined;
  const results: MethodResult[] = [];
  for (let i = 0; i < input.methods.length; i++) {
    results.push(
      runMethod({
        rows,
        elements: input.elements,
        spacingWavelengths: input.spacingWavelengths,
        method: input.methods[i],
        options: input.options,
        ...(covariance ? { covariance } : {}),
        ...(sample ? { sampleCovariance: sample } : {}),
        ...(subset ? { enabledIndices: subset } : {}),
      }),
    );
    report(0.3 + (0.7 * (i + 1)) / input.methods.length);
  }
  return { results };
}

/** Reads every reference (40 % of the progress), then fits and reports (lib/doa/calibration/report.ts). */
export async function computeCalibration(input: CalibrationComputeInput, report: Report): Promise<CalibrationResult> {
  const count = input.references.length;
  const references = [];
  for (let i = 0; i < count; i++) {
    const r = input.references[i];
    const rows = await loadRows(r.source, (f) => report((0.4 * (i + f)) / count), 1);
    references.push({ rows, bearingsDeg: r.bearingsDeg });
  }
  report(0.4);
  return calibrate(references, {
    spacingWavelengths: input.spacingWavelengths,
    method: input.method,
    onProgress: (f) => report(0.4 + 0.6 * f),
  });
}

/** Parses an uploaded file and computes its page figures (lib/storage/summary.ts); the snapshots stay in the worker. */
export async function computeDatasetParse(input: DatasetParseInput, report: Report): Promise<DatasetParseOutput> {
  const parsed = await parseSnapshotFile({
    path: input.path,
    fileName: input.fileName,
    format: input.format,
    maxBytes: input.maxBytes,
    ...(input.parseOptions ?? {}),
    onProgress: ({ bytesRead, totalBytes }) => report((0.8 * bytesRead) / Math.max(1, totalBytes)),
  });
  const summary = summarise(parsed);
  report(1);
  return {
    format: parsed.format,
    elements: parsed.elements,
    snapshots: parsed.snapshots,
    ...(parsed.sampleRate ? { sampleRate: parsed.sampleRate } : {}),
    details: parsed.details as unknown as Record<string, unknown>,
    summary,
  };
}

/**
 * Runs the covariance paths (both layouts, the chunk sums of the pooled path) and a
 * Hermitian EVD on seeded synthetic snapshots, `rounds` times, so that a thread's
 * JavaScript and WebAssembly are compiled by its optimising tiers before the first real
 * job (it took some 15 large calls otherwise, each about twice as slow). About 0.1 s.
 */
function warmUp(rounds: number): { kernel: 'wasm' | 'js'; ms: number } {
  const t0 = performance.now();
  const m = 32;
  const n = 2 * COVARIANCE_CHUNK;
  const x = simulateSnapshots({
    elements: m,
    spacingWavelengths: 0.5,
    bearingsDeg: [-10, 25],
    noisePower: 1,
    snapshots: n,
    seed: 11,
  });
  const rows = transpose(x);
  for (let r = 0; r < Math.max(1, Math.floor(rounds)); r++) {
    covarianceChunkSums(rows, 'rows', 0, 2);
    covarianceChunkSums(x, 'snapshots', 0, 2);
    hermitianEigen(sampleCovarianceFromRows(rows));
  }
  return { kernel: covarianceKernelInUse(), ms: performance.now() - t0 };
}

export async function compute<K extends ComputeTaskName>(
  task: K,
  input: ComputeTasks[K]['input'],
  report: Report,
): Promise<ComputeTasks[K]['output']> {
  switch (task) {
    case 'estimate':
      return (await computeEstimate(input as EstimateComputeInput, report)) as ComputeTasks[K]['output'];
    case 'calibration':
      return (await computeCalibration(input as CalibrationComputeInput, report)) as ComputeTasks[K]['output'];
    case 'study':
      return (await runStudy(input as StudySpec, { onProgress: report })) as ComputeTasks[K]['output'];
    case 'dataset.parse':
      return (await computeDatasetParse(input as DatasetParseInput, report)) as ComputeTasks[K]['output'];
    case 'btr.blocks':
      return (await computeBtrBlocks(input as BtrBlocksInput, report)) as ComputeTasks[K]['output'];
    case 'covariance.chunks': {
      const c = input as CovarianceChunksInput;
      const x = { rows: c.rows, cols: c.cols, re: c.re, im: c.im };
      return { sums: covarianceChunkSums(x, c.layout, c.firstChunk, c.chunkCount, c.out) } as ComputeTasks[K]['output'];
    }
    case 'warm-up':
      return warmUp((input as { rounds?: number }).rounds ?? 24) as ComputeTasks[K]['output'];
    case 'estimate.request':
      return parseEstimateRequest(input as EstimateRequestInput) as ComputeTasks[K]['output'];
    default:
      throw new Error(`unknown compute task ${String(task)}`);
  }
}

/**
 * An error as it crosses the thread boundary: structured cloning keeps only
 * name and message, so the fields the API needs (code, status, location,
 * field) travel explicitly and the class is rebuilt on the other side.
 */
export interface EncodedError {
  name: string;
  message: string;
  code?: string;
  status?: number;
  location?: { row?: number; column?: number };
  field?: string;
  cost?: number;
  budget?: number;
  stack?: string;
  /** CalibrationInputError: which reference and bearing (0-based). */
  reference?: number;
  bearing?: number;
}

export function encodeError(err: unknown): EncodedError {
  if (err instanceof DatasetError) {
    return {
      name: 'DatasetError',
      message: err.message,
      code: err.code,
      status: err.status,
      ...(err.location ? { location: err.location } : {}),
    };
  }
  if (err instanceof WidebandInputError) return { name: 'WidebandInputError', message: err.message, field: err.field };
  if (err instanceof DoaInputError) return { name: 'DoaInputError', message: err.message, code: err.code };
  if (err instanceof DoaNumericalError) return { name: 'DoaNumericalError', message: err.message, code: err.code };
  if (err instanceof CalibrationInputError)
    return {
      name: 'CalibrationInputError',
      message: err.message,
      field: err.what,
      reference: err.reference,
      ...(err.bearing !== undefined ? { bearing: err.bearing } : {}),
    };
  if (err instanceof StudyInputError) return { name: 'StudyInputError', message: err.message, field: err.field };
  if (err instanceof StudyBudgetError)
    return { name: 'StudyBudgetError', message: err.message, cost: err.cost, budget: err.budget };
  if (err instanceof StudyAbortedError) return { name: 'StudyAbortedError', message: err.message };
  const e = err instanceof Error ? err : new Error(String(err));
  return { name: e.name, message: e.message, ...(e.stack ? { stack: e.stack } : {}) };
}

export function decodeError(e: EncodedError): Error {
  switch (e.name) {
    case 'DatasetError':
      return new DatasetError(
        e.status as ConstructorParameters<typeof DatasetError>[0],
        e.code as ConstructorParameters<typeof DatasetError>[1],
        e.message,
        e.location,
      );
    case 'DoaInputError':
      return new DoaInputError(e.code as ConstructorParameters<typeof DoaInputError>[0], e.message);
    case 'WidebandInputError':
      return new WidebandInputError(e.field ?? 'options', e.message);
    case 'DoaNumericalError':
      return new DoaNumericalError(e.code as ConstructorParameters<typeof DoaNumericalError>[0], e.message);
    case 'CalibrationInputError':
      return new CalibrationInputError(
        e.message,
        e.reference ?? 0,
        (e.field ?? 'bearingsDeg') as 'bearingsDeg' | 'datasetId',
        e.bearing,
      );
    case 'StudyInputError':
      return new StudyInputError(e.field ?? 'spec', e.message);
    case 'StudyBudgetError':
      return new StudyBudgetError(e.cost ?? 0, e.budget ?? 0, e.message);
    case 'StudyAbortedError':
      return new StudyAbortedError();
    default: {
      const out = new Error(e.message);
      out.name = e.name;
      if (e.stack) out.stack = e.stack;
      return out;
    }
  }
}
