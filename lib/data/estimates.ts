import 'server-only';
import { Op } from 'sequelize';
import { ArrayDesign, ArrayRevision, Dataset, EstimateRun, Job, User } from '@/models';
import { ApiError } from '../http';
import { assertPermission, type Caller } from '../auth';
import { recordAudit } from './record-audit';
import { getDb } from '../db';
import { inWriteBatch } from '../db/write-batch';
import { DatasetError, sha256File } from '../datasets';
import {
  bounds,
  defaultSingleSnapshotSubarray,
  DoaInputError,
  DoaNumericalError,
  selectElements,
  type ComplexMatrix,
  type DoaMethod,
} from '../doa';
import { isUnitGain, type ElementGainState } from '../doa/calibration';
import { enqueueJob, recordFinishedJob, registerJobKind, stopRecordJob, waitForJob, type JobContext } from '../jobs';
import {
  compactStoredResult,
  expandStoredResult,
  type MethodResult,
  type RunOptions,
  type StoredMethodResult,
} from '../jobs/estimate-run';
import type { EstimateComputeInput, SnapshotSource } from '../jobs/compute';
import { runCompute, runEstimateCompute } from '../jobs/pool';
import { parseEstimateRequest, type EstimateRequestOutput } from '../jobs/estimate-request';
import { z } from 'zod';
import { maxUploadBytes } from '../env';
import { resolveStoragePath } from '../storage/files';
import { ensureLocalFile } from '../storage/shared';
import {
  nestedSnapshots,
  prepareSnapshotSet,
  readSnapshotSet,
  storeSnapshotSet,
  writePreparedSnapshotSet,
  type SnapshotSetRef,
} from '../storage/snapshots';
import { compareRuns, type RerunComparison } from '../runs/compare';
import { SOFTWARE_VERSION } from '../version';
import type { EstimateRequest } from '../validations/estimate';
import { datasetErrorToApi, findTeamArrayRevision } from './datasets';

/** The geometry a run used, stored with it. */
export interface RunArray {
  elements: number;
  spacingWavelengths: number;
  arrayId?: number;
  arrayRevisionId?: number;
  revision?: number;
  name?: string;
  /** Disabled elements of the revision, 1-based (absent or empty: all enabled). */
  disabledElements?: number[];
}

/**
 * The element calibration a run applied (docs/conventions.md §9). `applied` with the
 * revision it came from and its gains (dB, deg per element, relative to element 1), or not
 * applied with the reason.
 */
export interface RunCalibration {
  applied: boolean;
  revision?: number;
  arrayRevisionId?: number;
  gains?: ElementGainState[];
  /** Why nothing was applied, for people. */
  note?: string;
}

/** What a run stores as `inputs`: the request as validated plus what it resolved to. */
export interface RunInputs {
  request: EstimateRequest;
  methods: DoaMethod[];
  options: RunOptions;
  array: RunArray;
  dataset?: { id: number; sha256: string; name: string; elements: number; snapshots: number };
  /** Inline snapshots, stored once by content (lib/storage/snapshots.ts); `request.snapshots` is then left out. */
  snapshotSet?: SnapshotSetRef;
  rerunOf?: number;
  /** Absent in runs stored before calibrations were applied (nothing was). */
  calibration?: RunCalibration;
}

export interface EstimateRunDto {
  id: number;
  status: EstimateRun['status'];
  progress: number;
  error: string | null;
  inputs: RunInputs;
  softwareVersion: string;
  datasetSha256: string | null;
  arrayRevisionId: number | null;
  createdAt: string;
  updatedAt: string;
  createdBy: { id: number; name: string } | null;
  results: MethodResult[];
}

export type EstimateRunListItem = Pick<
  EstimateRunDto,
  'id' | 'status' | 'progress' | 'error' | 'createdAt' | 'softwareVersion'
> & {
  methods: DoaMethod[];
  datasetName: string | null;
  arrayLabel: string;
  bearingsDeg: Record<string, number[]>;
};

/** A run's `result` column: the method results in their stored (compact) form. */
function storedResultColumn(results: MethodResult[]): Record<string, unknown> {
  return { results: results.map(compactStoredResult) };
}

/** The full method results of a run's `result` column (compact or stored in full). */
export function resultsOfRun(result: unknown): MethodResult[] {
  const list = (result as { results?: StoredMethodResult[] } | null)?.results;
  return Array.isArray(list) ? list.map(expandStoredResult) : [];
}

function toDto(run: EstimateRun, creator: Pick<User, 'id' | 'name'> | null): EstimateRunDto {
  return {
    id: run.id,
    status: run.status,
    progress: run.progress,
    error: run.error ?? null,
    inputs: run.inputs as unknown as RunInputs,
    softwareVersion: run.softwareVersion,
    datasetSha256: run.datasetSha256 ?? null,
    arrayRevisionId: (run.arrayRevisionId as number | null) ?? null,
    createdAt: run.createdAt.toISOString(),
    updatedAt: run.updatedAt.toISOString(),
    createdBy: creator ? { id: creator.id, name: creator.name } : null,
    results: resultsOfRun(run.result),
  };
}

/** The §7 answer fields of one method result (no uncertainty or criteria). */
export function v1Fields(r: MethodResult) {
  return {
    method: r.method,
    sourceCount: r.sourceCount,
    sourceCountRule: r.sourceCountRule,
    bearingsDeg: r.bearingsDeg,
    eigenvalues: r.eigenvalues,
    warnings: r.warnings,
    ...(r.spectrum
      ? { spectrum: { startDeg: r.spectrum.startDeg, stepDeg: r.spectrum.stepDeg, valuesDb: r.spectrum.valuesDb } }
      : {}),
  };
}

/** The §7 answer of POST /api/v1/estimates: the first (or only) method's fields and the run id. */
export function v1Answer(run: EstimateRunDto) {
  const first = run.results[0];
  return { id: run.id, ...(first ? v1Fields(first) : {}) };
}

/** GET /api/v1/estimates/{id}: the §7 fields, the inputs, and every method's full result. */
export function v1RunBody(run: EstimateRunDto) {
  return { ...v1Answer(run), ...run };
}

type StoredElementState = { enabled?: boolean; gainDb?: number; phaseDeg?: number };

function elementStatesOf(revision: ArrayRevision): StoredElementState[] {
  const states = (revision.config as { elementStates?: StoredElementState[] }).elementStates;
  return Array.isArray(states) ? states : [];
}

/** An array revision's disabled elements (from the designer's elementStates), 1-based. */
function disabledElements(revision: ArrayRevision): number[] {
  return elementStatesOf(revision).flatMap((s, i) => (s && s.enabled === false ? [i + 1] : []));
}

/** The revision's gains (every element, 0 dB and 0° where a state is missing), or null when none differs from 1. */
function revisionGains(revision: ArrayRevision): ElementGainState[] | null {
  const states = elementStatesOf(revision);
  const gains = Array.from({ length: revision.elements }, (_, i) => ({
    gainDb: Number(states[i]?.gainDb ?? 0) || 0,
    phaseDeg: Number(states[i]?.phaseDeg ?? 0) || 0,
  }));
  return isUnitGain(gains) ? null : gains;
}

/** 0-based enabled elements of a run's line (all when none is disabled). */
export function enabledIndicesOf(array: RunArray): number[] {
  const off = new Set(array.disabledElements ?? []);
  return Array.from({ length: array.elements }, (_, i) => i).filter((i) => !off.has(i + 1));
}

/**
 * The smallest element count the methods of a run use on a line with disabled elements
 * (lib/doa selectElements), for the size checks; 422 naming arrayId when a method cannot run.
 */
function usableElements(array: RunArray, methods: DoaMethod[], options: RunOptions): number {
  if (!array.disabledElements?.length) return array.elements;
  const enabled = enabledIndicesOf(array);
  let least = array.elements;
  for (const method of methods) {
    try {
      least = Math.min(least, selectElements(method, enabled, array.elements, options).indices.length);
    } catch (err) {
      if (err instanceof DoaInputError)
        throw new ApiError(
          'validation_failed',
          `Array "${array.name}" (revision ${array.revision}): ${err.message} (disabled elements ${array.disabledElements.join(', ')}).`,
          { fields: { arrayId: [err.message] } },
        );
      throw err;
    }
  }
  return least;
}

/** What a run applies: the revision's calibration unless switched off or there is none. */
function calibrationFor(input: EstimateRequest, array: RunArray, gains: ElementGainState[] | null): RunCalibration {
  if (array.arrayRevisionId === undefined)
    return { applied: false, note: 'The array was given inline; it carries no calibration.' };
  if (!gains)
    return {
      applied: false,
      revision: array.revision,
      arrayRevisionId: array.arrayRevisionId,
      note: `Revision ${array.revision} has no calibration (every element at 0 dB, 0°).`,
    };
  if (input.applyCalibration === false)
    return {
      applied: false,
      revision: array.revision,
      arrayRevisionId: array.arrayRevisionId,
      gains,
      note: `The calibration of revision ${array.revision} was switched off for this run.`,
    };
  return { applied: true, revision: array.revision, arrayRevisionId: array.arrayRevisionId, gains };
}

/**
 * The effective element count L for the options, with the same rules the
 * engine applies (docs/conventions.md §2), so that a bad size is refused with 422
 * before anything is stored.
 */
function checkSizes(m: number, options: RunOptions, snapshots: number): void {
  const fields: Record<string, string[]> = {};
  let size = m;
  if (options.singleSnapshot) {
    const l = options.singleSnapshotSubarray ?? defaultSingleSnapshotSubarray(m);
    if (l > m) fields.singleSnapshotSubarray = [`singleSnapshotSubarray ${l} must be at most the ${m} elements`];
    else size = l;
  }
  if (options.smoothingSubarray !== undefined) {
    if (options.smoothingSubarray > size)
      fields.smoothingSubarray = [
        `smoothingSubarray ${options.smoothingSubarray} must be at most ${size} (the elements available)`,
      ];
    else size = options.smoothingSubarray;
  }
  if (options.sourceCount !== undefined && options.sourceCount >= size) {
    fields.sourceCount = [
      `sourceCount ${options.sourceCount} must be below the ${size} effective elements (K < ${size === m ? 'M' : 'L'} = ${size})`,
    ];
  }
  if (snapshots < 1) fields.snapshots = ['the data holds no snapshots'];
  const first = Object.entries(fields)[0];
  if (first) throw new ApiError('validation_failed', first[1][0], { fields });
}

function optionsOf(input: EstimateRequest): RunOptions {
  const o: RunOptions = {};
  if (input.sourceCount !== undefined) o.sourceCount = input.sourceCount;
  if (input.sourceCountRule !== undefined) o.sourceCountRule = input.sourceCountRule;
  if (input.forwardBackward !== undefined) o.forwardBackward = input.forwardBackward;
  if (input.smoothingSubarray !== undefined) o.smoothingSubarray = input.smoothingSubarray;
  if (input.singleSnapshot !== undefined) o.singleSnapshot = input.singleSnapshot;
  if (input.singleSnapshotSubarray !== undefined) o.singleSnapshotSubarray = input.singleSnapshotSubarray;
  if (input.includeSpectrum !== undefined) o.includeSpectrum = input.includeSpectrum;
  return o;
}

async function resolveArray({
  caller,
  input,
  dataset,
  pinnedRevisionId,
}: {
  caller: Caller;
  input: EstimateRequest;
  dataset: Dataset | null;
  pinnedRevisionId?: number;
}): Promise<{ array: RunArray; gains: ElementGainState[] | null }> {
  let revision: ArrayRevision | null = null;
  let design: ArrayDesign | null = null;
  if (pinnedRevisionId !== undefined) {
    revision = await ArrayRevision.findByPk(pinnedRevisionId);
    design = revision
      ? await ArrayDesign.findOne({ where: { id: revision.arrayId as number, teamId: caller.teamId } })
      : null;
    if (!revision || !design)
      throw new ApiError(
        'conflict',
        `The array revision this run used (id ${pinnedRevisionId}) no longer exists; start a new run.`,
      );
  } else if (input.array) {
    return {
      array: { elements: input.array.elements, spacingWavelengths: input.array.spacingWavelengths },
      gains: null,
    };
  } else {
    const arrayId = input.arrayId ?? (dataset?.arrayId as number | null) ?? undefined;
    if (arrayId === undefined) {
      throw new ApiError(
        'validation_failed',
        'Give arrayId or array {elements, spacingWavelengths}: the spacing is needed to turn phases into bearings.',
        {
          fields: { arrayId: ['arrayId or array is required'] },
        },
      );
    }
    ({ array: design, revision } = await findTeamArrayRevision({
      caller,
      arrayId,
      revision: input.arrayId !== undefined ? input.arrayRevision : undefined,
    }));
  }
  const disabled = disabledElements(revision);
  return {
    array: {
      elements: revision.elements,
      spacingWavelengths: revision.spacingWavelengths,
      arrayId: design.id,
      arrayRevisionId: revision.id,
      revision: revision.revision,
      name: design.name,
      ...(disabled.length ? { disabledElements: disabled } : {}),
    },
    gains: revisionGains(revision),
  };
}

function inlineRows(s: NonNullable<EstimateRequest['snapshots']>): ComplexMatrix {
  const n = s.re.length;
  const m = s.re[0].length;
  const re = new Float64Array(n * m);
  const im = new Float64Array(n * m);
  for (let r = 0; r < n; r++) {
    for (let c = 0; c < m; c++) {
      const a = s.re[r][c];
      const b = s.im[r][c];
      if (!Number.isFinite(a) || !Number.isFinite(b))
        throw new ApiError('validation_failed', `snapshots row ${r + 1}, column ${c + 1} is not a finite number`, {
          fields: { snapshots: ['not finite'] },
        });
      re[r * m + c] = a;
      im[r * m + c] = b;
    }
  }
  return { rows: n, cols: m, re, im };
}

function engineToApi(err: unknown): unknown {
  if (err instanceof DoaInputError)
    return new ApiError('validation_failed', `The estimate cannot be computed: ${err.message}.`, {
      fields: { engine: [err.code] },
    });
  if (err instanceof DoaNumericalError)
    return new ApiError('validation_failed', `The computation did not succeed on these data: ${err.message}.`, {
      fields: { engine: [err.code] },
    });
  if (err instanceof DatasetError) return datasetErrorToApi(err) ?? err;
  return err;
}

/**
 * Validates and stores a run, queues it, and (when `wait`) resolves once it
 * is done. Size problems (K ≥ L of the elements a method uses, a mismatched
 * element count, no usable run of enabled elements) are 422 before anything is stored; a run the engine refuses when
 * waited on is removed and answered with 422.
 */
export async function submitEstimate({
  caller,
  input,
  wait,
  pinnedRevisionId,
  rerunOf,
  rows: givenRows,
}: {
  caller: Caller;
  input: EstimateRequest;
  /** Inline snapshots already read into typed arrays (parseEstimateBody), instead of `input.snapshots`. */
  rows?: ComplexMatrix;
  wait: boolean;
  pinnedRevisionId?: number;
  rerunOf?: number;
}): Promise<EstimateRunDto> {
  assertPermission(caller, 'estimates.run');
  const db = await getDb();
  let dataset: Dataset | null = null;
  let m: number;
  let n: number;
  if (input.datasetId !== undefined) {
    dataset = await Dataset.findOne({ where: { id: input.datasetId, teamId: caller.teamId } });
    if (!dataset) throw new ApiError('not_found', `No dataset with id ${input.datasetId} in your team.`);
    m = dataset.elements;
    n = dataset.snapshots;
  } else {
    m = givenRows ? givenRows.cols : input.snapshots!.re[0].length;
    n = givenRows ? givenRows.rows : input.snapshots!.re.length;
  }
  const { array, gains } = await resolveArray({ caller, input, dataset, pinnedRevisionId });
  if (array.elements !== m) {
    const what = dataset
      ? `dataset "${dataset.name}" has ${m} columns (elements)`
      : `the snapshots have ${m} columns (elements)`;
    const arrayName = array.name ? `array "${array.name}" (revision ${array.revision})` : 'the array';
    throw new ApiError(
      'validation_failed',
      `The element counts differ: ${what} but ${arrayName} has ${array.elements} elements.`,
      {
        fields: { [input.array ? 'array' : 'arrayId']: [`${array.elements} elements, the data has ${m}`] },
      },
    );
  }
  const options = optionsOf(input);
  const methods: DoaMethod[] = input.methods ?? [input.method!];
  checkSizes(usableElements(array, methods, options), options, n);
  const calibration = calibrationFor(input, array, gains);
  let request = input;
  let rows: ComplexMatrix | undefined = input.datasetId === undefined ? givenRows : undefined;
  if (input.snapshots) {
    rows = inlineRows(input.snapshots);
    const { snapshots: _inline, ...rest } = input;
    void _inline;
    request = rest;
  }
  const inputsWith = (snapshotSet: SnapshotSetRef | undefined): RunInputs => ({
    request,
    ...(snapshotSet ? { snapshotSet } : {}),
    methods,
    options,
    array,
    ...(dataset
      ? {
          dataset: {
            id: dataset.id,
            sha256: dataset.sha256,
            name: dataset.name,
            elements: dataset.elements,
            snapshots: dataset.snapshots,
          },
        }
      : {}),
    ...(rerunOf !== undefined ? { rerunOf } : {}),
    calibration,
  });
  // An inline set the client waits for: computed first, then stored in one transaction.
  if (wait && rows) return runInlineNow({ caller, rows, inputsWith, methods, rerunOf });
  const inputs = inputsWith(rows ? await storeSnapshotSet(rows) : undefined);
  const { run, job } = await db.transaction(async (transaction) => {
    const created = await EstimateRun.create(
      {
        teamId: caller.teamId,
        status: 'queued',
        datasetId: dataset ? dataset.id : null,
        datasetSha256: dataset ? dataset.sha256 : null,
        arrayRevisionId: array.arrayRevisionId ?? null,
        inputs: inputs as unknown as Record<string, unknown>,
        softwareVersion: SOFTWARE_VERSION,
        createdById: caller.id,
      },
      { transaction },
    );
    await recordAudit(
      {
        teamId: caller.teamId,
        userId: caller.id,
        action: rerunOf ? 'estimate.rerun' : 'estimate.started',
        target: methods.join(', '),
        detail: { id: created.id, rerunOf: rerunOf ?? null },
      },
      transaction,
    );
    const queued = await enqueueJob({
      kind: ESTIMATE_JOB,
      inputRef: String(created.id),
      teamId: caller.teamId,
      ownerId: caller.id,
      transaction,
    });
    return { run: created, job: queued };
  });
  if (!wait) return getEstimateRun({ caller, id: run.id });
  const outcome = await waitForJob(job.id);
  if (outcome.status === 'failed' && outcome.cause !== undefined) {
    const mapped = engineToApi(outcome.cause);
    if (mapped instanceof ApiError) {
      // A refusal of the engine on a waited run is answered as 422 and leaves nothing behind.
      await db.transaction(async (transaction) => {
        await EstimateRun.destroy({ where: { id: run.id }, transaction });
        await Job.destroy({ where: { id: job.id }, transaction });
      });
      throw mapped;
    }
  }
  return getEstimateRun({ caller, id: run.id });
}

export const ESTIMATE_JOB = 'estimate';

/** Bodies from this size on are parsed in a worker thread (a 16 × 1000 inline set is 0.62 MB). */
const PARSE_IN_WORKER_BYTES = 128 * 1024;

/**
 * A POST /api/v1/estimates body read and validated (lib/jobs/estimate-request.ts): large
 * bodies in a worker thread, so the web thread does not spend the JSON parse; small ones in
 * place. Malformed JSON is 400 and a schema refusal 422 with the schema's messages, as with
 * readJson and parseBody. Inline snapshots come back as typed arrays in `rows`.
 */
export async function parseEstimateBody(bytes: Buffer): Promise<{ input: EstimateRequest; rows?: ComplexMatrix }> {
  let out: EstimateRequestOutput;
  if (bytes.byteLength < PARSE_IN_WORKER_BYTES) out = parseEstimateRequest({ body: bytes });
  else {
    // Moved, not copied, to the worker (a copy first when the bytes share their buffer).
    const own =
      bytes.byteOffset === 0 && bytes.byteLength === bytes.buffer.byteLength
        ? bytes
        : Uint8Array.prototype.slice.call(bytes);
    out = await runCompute('estimate.request', { body: own }, { transferList: [own.buffer as ArrayBuffer] });
  }
  if ('badJson' in out) throw new ApiError('bad_json', `The request body is not valid JSON: ${out.badJson}`);
  if ('issues' in out) throw new z.ZodError(out.issues as z.core.$ZodIssue[]);
  return out.rows ? { input: out.request, rows: out.rows } : { input: out.request };
}

/** Where the worker finds a run's snapshots: the stored dataset file, or the request's inline matrix. */
async function snapshotSource(
  run: EstimateRun,
  inputs: RunInputs,
): Promise<{ source: SnapshotSource; transferList?: ArrayBuffer[] }> {
  if (inputs.dataset) {
    const dataset = await Dataset.findOne({ where: { id: inputs.dataset.id, teamId: run.teamId as number } });
    if (!dataset)
      throw new ApiError(
        'conflict',
        `The dataset this run used ("${inputs.dataset.name}", id ${inputs.dataset.id}) has been deleted.`,
      );
    return {
      source: {
        kind: 'file',
        path: await ensureLocalFile(dataset.storagePath),
        format: dataset.format,
        fileName: dataset.originalName,
        maxBytes: Math.max(maxUploadBytes(), Number(dataset.bytes)),
        parseOptions: (dataset.options ?? {}) as Extract<SnapshotSource, { kind: 'file' }>['parseOptions'],
      },
    };
  }
  if (inputs.snapshotSet) {
    const ref = inputs.snapshotSet;
    return {
      source: {
        kind: 'raw',
        path: await ensureLocalFile(ref.path),
        rows: ref.rows,
        cols: ref.cols,
        sha256: ref.sha256,
      },
    };
  }
  // Runs stored before snapshot sets (or imported from a bundle) carry their matrix inline.
  const rows = inlineRows(inputs.request.snapshots!);
  return {
    source: { kind: 'matrix', ...rows },
    transferList: [rows.re.buffer as ArrayBuffer, rows.im.buffer as ArrayBuffer],
  };
}

/**
 * The estimate job kind: the run row is its input (`inputRef` = run id). The
 * compute runs in a worker thread (lib/jobs/compute.ts); the same inputs give
 * the same results, so a job re-queued after a crash stores the same answer.
 */
registerJobKind<{ results: MethodResult[] } | null>({
  kind: ESTIMATE_JOB,
  maxAttempts: 2,
  async run({ job, signal, setProgress }: JobContext) {
    const run = await EstimateRun.findByPk(Number(job.inputRef));
    if (!run) return null; // deleted meanwhile
    const inputs = run.inputs as unknown as RunInputs;
    const { source, transferList } = await snapshotSource(run, inputs);
    const { results } = await runEstimateCompute(computeInputOf(inputs, source), {
      signal,
      onProgress: setProgress,
      ...(transferList ? { transferList } : {}),
    });
    return { results };
  },
  // Result and status in one write (onState skips 'done'), in the transaction that marks the job done.
  async store({ job, value, transaction }) {
    if (!value) return;
    await EstimateRun.update(
      { result: storedResultColumn(value.results), status: 'done', progress: 1, error: null },
      { where: { id: Number(job.inputRef) }, transaction },
    );
  },
  async onState({ inputRef, status, progress, error }) {
    if (status === 'done') return;
    // A late heartbeat ('running') must not overwrite the 'done' that run() wrote with the result.
    await EstimateRun.update(
      { status, progress, error },
      { where: { id: Number(inputRef), status: { [Op.ne]: 'done' } } },
    );
  },
  describeError: describeEstimateError,
});

function describeEstimateError(err: unknown): string {
  const mapped = engineToApi(err);
  if (mapped instanceof ApiError) return mapped.message;
  console.error('[steerwise] estimate run failed', err);
  return 'The run failed on the server; the detail has been logged.';
}

/** What the worker's estimate task gets for a run's inputs and snapshot source. */
function computeInputOf(inputs: RunInputs, source: SnapshotSource): EstimateComputeInput {
  return {
    source,
    elements: inputs.array.elements,
    spacingWavelengths: inputs.array.spacingWavelengths,
    methods: inputs.methods,
    options: inputs.options,
    ...(inputs.calibration?.applied && inputs.calibration.gains ? { calibration: inputs.calibration.gains } : {}),
    ...(inputs.array.disabledElements?.length ? { enabledIndices: enabledIndicesOf(inputs.array) } : {}),
  };
}

/**
 * An inline run whose client waits for the answer (POST /api/v1/estimates without
 * `Prefer: respond-async`, a waited re-run). The compute runs first, on the pool, with the
 * matrix moved to the worker; then the snapshot set is written (once per content) and the
 * run (done, with its result), its job (done) and the audit event are inserted in one
 * transaction (on SQLite grouped with other requests' inline runs, lib/db/write-batch.ts), and the answer is built from what was inserted. Nothing is stored before the
 * result exists: an engine refusal is a 422 with nothing behind it, and a server stopped
 * midway leaves no row to recover (the client sees the connection drop and may post again).
 * A failure other than a refusal is stored as a failed run and job, as the queued path does.
 */
async function runInlineNow({
  caller,
  rows,
  inputsWith,
  methods,
  rerunOf,
}: {
  caller: Caller;
  rows: ComplexMatrix;
  inputsWith: (snapshotSet: SnapshotSetRef) => RunInputs;
  methods: DoaMethod[];
  rerunOf?: number;
}): Promise<EstimateRunDto> {
  await getDb();
  const startedAt = new Date();
  const prepared = prepareSnapshotSet(rows);
  const inputs = inputsWith(prepared.ref);
  let results: MethodResult[] | undefined;
  let failure: unknown;
  try {
    ({ results } = await runEstimateCompute(computeInputOf(inputs, { kind: 'matrix', ...rows }), {
      transferList: [rows.re.buffer as ArrayBuffer, rows.im.buffer as ArrayBuffer],
    }));
  } catch (err) {
    failure = err ?? new Error('the compute failed');
    const mapped = engineToApi(failure);
    if (mapped instanceof ApiError) throw mapped;
  }
  await writePreparedSnapshotSet(prepared);
  const error = results ? null : describeEstimateError(failure);
  const run = await inWriteBatch(async (transaction) => {
    const created = await EstimateRun.create(
      {
        teamId: caller.teamId,
        status: results ? 'done' : 'failed',
        progress: results ? 1 : 0,
        datasetId: null,
        datasetSha256: null,
        arrayRevisionId: inputs.array.arrayRevisionId ?? null,
        inputs: inputs as unknown as Record<string, unknown>,
        result: results ? storedResultColumn(results) : null,
        error,
        softwareVersion: SOFTWARE_VERSION,
        createdById: caller.id,
      },
      { transaction },
    );
    await recordAudit(
      {
        teamId: caller.teamId,
        userId: caller.id,
        action: rerunOf ? 'estimate.rerun' : 'estimate.started',
        target: methods.join(', '),
        detail: rerunOf ? { id: created.id, rerunOf } : { id: created.id },
      },
      transaction,
    );
    await recordFinishedJob({
      kind: ESTIMATE_JOB,
      inputRef: String(created.id),
      teamId: caller.teamId,
      ownerId: caller.id,
      status: results ? 'done' : 'failed',
      error,
      startedAt,
      transaction,
    });
    return created;
  });
  return toDto(run, { id: caller.id, name: caller.name });
}

/**
 * Stops a queued or running run (engineers, admins). 409 when it has already
 * ended; the run then keeps its status.
 */
export async function cancelEstimate({ caller, id }: { caller: Caller; id: number }): Promise<EstimateRunDto> {
  assertPermission(caller, 'estimates.run');
  await getDb();
  const run = await EstimateRun.findOne({ where: { id, teamId: caller.teamId } });
  if (!run) throw new ApiError('not_found', `No estimate run with id ${id} in your team.`);
  const stopped = await stopRecordJob(ESTIMATE_JOB, id, caller.name);
  if (!stopped) {
    const now = await EstimateRun.findByPk(id);
    throw new ApiError(
      'conflict',
      `Run ${id} is ${now?.status ?? run.status}; only a queued or running run can be stopped.`,
    );
  }
  await recordAudit({
    teamId: caller.teamId,
    userId: caller.id,
    action: 'estimate.cancelled',
    target: String(id),
    detail: { id },
  });
  return getEstimateRun({ caller, id });
}

export async function getEstimateRun({ caller, id }: { caller: Caller; id: number }): Promise<EstimateRunDto> {
  assertPermission(caller, 'datasets.read');
  await getDb();
  const run = await EstimateRun.findOne({ where: { id, teamId: caller.teamId } });
  if (!run) throw new ApiError('not_found', `No estimate run with id ${id} in your team.`);
  const creator = run.createdById ? await User.findByPk(run.createdById as number) : null;
  return toDto(run, creator);
}

export async function listEstimateRuns({
  caller,
  limit = 50,
}: {
  caller: Caller;
  limit?: number;
}): Promise<EstimateRunListItem[]> {
  assertPermission(caller, 'datasets.read');
  await getDb();
  const runs = await EstimateRun.findAll({
    where: { teamId: caller.teamId },
    order: [
      ['createdAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit,
  });
  return runs.map((run) => {
    const inputs = run.inputs as unknown as RunInputs;
    const results = ((run.result ?? {}) as { results?: MethodResult[] }).results ?? [];
    return {
      id: run.id,
      status: run.status,
      progress: run.progress,
      error: run.error ?? null,
      createdAt: run.createdAt.toISOString(),
      softwareVersion: run.softwareVersion,
      methods: inputs.methods ?? [],
      datasetName: inputs.dataset?.name ?? null,
      arrayLabel: inputs.array?.name
        ? `${inputs.array.name} r${inputs.array.revision}`
        : `${inputs.array?.elements} × ${inputs.array?.spacingWavelengths} λ`,
      bearingsDeg: Object.fromEntries(results.map((r) => [r.method, r.bearingsDeg])),
    };
  });
}

/**
 * Runs a stored run again with its exact inputs: the same array revision
 * (not the array's latest), the same dataset file (its SHA-256 is checked
 * again; 409 if the file changed or the dataset is gone) and options; then
 * compares the bearings method by method.
 */
export async function rerunEstimate({ caller, id, wait }: { caller: Caller; id: number; wait: boolean }): Promise<{
  run: EstimateRunDto;
  rerunOf: number;
  comparison: RerunComparison[] | null;
  softwareVersionThen: string;
}> {
  assertPermission(caller, 'estimates.run');
  const old = await getEstimateRun({ caller, id });
  const inputs = old.inputs;
  if (inputs.dataset) {
    const dataset = await Dataset.findOne({ where: { id: inputs.dataset.id, teamId: caller.teamId } });
    if (!dataset)
      throw new ApiError(
        'conflict',
        `The dataset this run used ("${inputs.dataset.name}", id ${inputs.dataset.id}) has been deleted; the run cannot be repeated.`,
      );
    const digest = await sha256File(resolveStoragePath(dataset.storagePath)).catch(() => null);
    if (digest !== inputs.dataset.sha256) {
      throw new ApiError(
        'conflict',
        `The stored file of dataset "${dataset.name}" no longer has the SHA-256 the run used (${inputs.dataset.sha256.slice(0, 12)}…); the run cannot be repeated exactly.`,
      );
    }
  }
  const request: EstimateRequest = { ...inputs.request };
  if (inputs.snapshotSet) {
    const matrix = await readSnapshotSet(inputs.snapshotSet);
    if (!matrix)
      throw new ApiError(
        'conflict',
        `The stored snapshots of run ${id} (SHA-256 ${inputs.snapshotSet.sha256.slice(0, 12)}…) are missing or changed; the run cannot be repeated exactly.`,
      );
    request.snapshots = nestedSnapshots(matrix);
  }
  if (inputs.array.arrayRevisionId === undefined)
    request.array = { elements: inputs.array.elements, spacingWavelengths: inputs.array.spacingWavelengths };
  const run = await submitEstimate({
    caller,
    input: request,
    wait,
    pinnedRevisionId: inputs.array.arrayRevisionId,
    rerunOf: id,
  });
  const comparison = run.status === 'done' && old.status === 'done' ? compareRuns(old.results, run.results) : null;
  return { run, rerunOf: id, comparison, softwareVersionThen: old.softwareVersion };
}

/** POST /api/v1/bounds: lib/doa bounds() with engine errors as 422. */
export async function computeBounds({ caller, input }: { caller: Caller; input: Parameters<typeof bounds>[0] }) {
  assertPermission(caller, 'datasets.read');
  try {
    return bounds(input);
  } catch (err) {
    throw engineToApi(err);
  }
}
