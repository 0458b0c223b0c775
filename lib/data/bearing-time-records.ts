import 'server-only';
import fs from 'node:fs';
import path from 'node:path';
import { BearingTimeRecord, Dataset, User } from '@/models';
import { ApiError } from '../http';
import { assertPermission, type Caller } from '../auth';
import { recordAudit } from './record-audit';
import { getDb } from '../db';
import { dataDir, maxUploadBytes } from '../env';
import { cancelJob, enqueueJob, latestJob, registerJobKind, stopRecordJob, waitForJob } from '../jobs';
import { poolSize, runCompute } from '../jobs/pool';
import type { BtrBlocksInput } from '../jobs/btr-blocks';
import { DatasetError } from '../datasets/errors';
import { openTimeSeries, type TimeSeriesFormat } from '../datasets/time-series';
import { blockCount, planWideband, WidebandInputError, type WidebandOptions } from '../doa/wideband';
import { BTR_DEFAULTS, type BearingTimeRecordRequest } from '../validations/bearing-time-record';
import { datasetErrorToApi, findTeamArrayRevision } from './datasets';
import { resolveStoragePath } from '../storage/files';
import { ensureLocalFile, storedBytes } from '../storage/shared';
import { SOFTWARE_VERSION } from '../version';
import {
  finishRecord,
  round,
  type BtrBlockDto,
  type BtrImageDto,
  type BtrInputs,
  type BtrSummary,
  type BtrTrackDto,
} from '../btr/result';

export type { BtrBlockDto, BtrImageDto, BtrInputs, BtrSummary, BtrTrackDto } from '../btr/result';

/**
 * Bearing–time records (issue 14; docs/bearing-time-records.md): a stored
 * time-series dataset (WAV, or NPY with a sample rate) analysed block by block
 * by lib/doa/wideband on the worker pool, then tracked.
 *
 * Roles as for estimates: creating, stopping and deleting need `estimates.run`
 * (engineers, admins); reading needs `datasets.read` (every role). Everything is
 * scoped by the caller's team.
 *
 * Storage: the row keeps the request, the resolved analysis options, the tracks
 * and a summary; the bulky result is a folder under the data folder,
 * `bearing-time-records/<team>/<id>/`:
 *   blocks.json   the per-block bearings, ±σ, source count and warnings;
 *   levels.f32    the full image, one row per block of `grid.count` float32 dB
 *                 values (little-endian), read for one block's spectrum and the PNG;
 *   image.json    the display grid (decimateImage: at most IMAGE_MAX_ROWS rows, the
 *                 group maximum in dB, 0.01 dB).
 * Every refusal (bad request, a recording that does not fit the array or the
 * options, a truncated file) is a 4xx before anything is stored.
 */

export const BTR_JOB = 'bearing-time-record';
/** Blocks per pool share at least this many, so short records use fewer threads. */
const MIN_BLOCKS_PER_SHARE = 8;

export interface BtrDto {
  id: number;
  name: string;
  status: BearingTimeRecord['status'];
  progress: number;
  error: string | null;
  datasetId: number | null;
  arrayRevisionId: number | null;
  inputs: BtrInputs;
  softwareVersion: string;
  createdAt: string;
  updatedAt: string;
  createdBy: { id: number; name: string } | null;
  /** Present when done (else empty / null). */
  blocks: BtrBlockDto[];
  tracks: BtrTrackDto[];
  image: BtrImageDto | null;
  summary: Omit<BtrSummary, 'tracks'> | null;
}

export interface BtrListItem {
  id: number;
  name: string;
  status: BearingTimeRecord['status'];
  progress: number;
  error: string | null;
  datasetId: number | null;
  datasetName: string;
  method: WidebandOptions['method'];
  band: { lowHz: number; highHz: number };
  durationS: number;
  blockCount: number;
  trackCount: number | null;
  arrayLabel: string;
  createdAt: string;
  createdBy: { id: number; name: string } | null;
}

function btrRoot(): string {
  return path.join(dataDir(), 'bearing-time-records');
}

function resultFolder(teamId: number, id: number): { abs: string; rel: string } {
  const rel = path.join('bearing-time-records', String(teamId), String(id));
  return { abs: path.join(dataDir(), rel), rel };
}

/** Maps the wideband module's option names onto the request's field names. */
function requestField(field: string, inputs: { arrayGiven: boolean }): string {
  if (field === 'elements') return inputs.arrayGiven ? 'array.elements' : 'arrayId';
  if (field === 'spacingM') return inputs.arrayGiven ? 'array.spacingM' : 'arrayId';
  if (field === 'channels' || field === 'sampleRate' || field === 'recording') return 'datasetId';
  return field;
}

/** Turns refusals of lib/doa/wideband and lib/datasets into 4xx bodies naming the field. */
export function btrErrorToApi(err: unknown, arrayGiven = true): unknown {
  if (err instanceof WidebandInputError) {
    const field = requestField(err.field, { arrayGiven });
    return new ApiError('validation_failed', `${field}: ${err.message}`, { fields: { [field]: [err.message] } });
  }
  if (err instanceof DatasetError) {
    const mapped = datasetErrorToApi(err);
    if (!mapped) return err;
    return new ApiError(mapped.code, `datasetId: the recording is refused: ${err.message}`, {
      fields: { ...(mapped.fields ?? {}), datasetId: [err.message] },
    });
  }
  return err;
}

/** The wideband options of a validated request and its resolved array. */
export function widebandOptionsOf(
  input: BearingTimeRecordRequest,
  array: { elements: number; spacingM: number },
  propagationSpeedMps: number,
): WidebandOptions {
  return {
    elements: array.elements,
    spacingM: array.spacingM,
    propagationSpeedMps,
    band: { lowHz: input.band.lowHz, highHz: input.band.highHz },
    blockSeconds: input.blockSeconds,
    blockOverlap: input.blockOverlap,
    fftLength: input.fftLength,
    ...(input.hop !== undefined ? { hop: input.hop } : {}),
    window: input.window,
    method: input.method,
    ...(input.sourceCount !== undefined ? { sourceCount: input.sourceCount } : {}),
    ...(input.sourceCountRule !== undefined ? { sourceCountRule: input.sourceCountRule } : {}),
    gratingLobes: input.gratingLobes,
    ...(input.bearingEstimator !== undefined ? { bearingEstimator: input.bearingEstimator } : {}),
  };
}

async function resolveArray(
  caller: Caller,
  input: BearingTimeRecordRequest,
): Promise<{ array: BtrInputs['array']; speed: number }> {
  if (input.arrayId !== undefined) {
    const found = await findTeamArrayRevision({ caller, arrayId: input.arrayId });
    const rev = found.revision;
    const states = (rev.config as { elementStates?: { enabled?: boolean }[] }).elementStates;
    const disabled = Array.isArray(states) ? states.flatMap((s, i) => (s && s.enabled === false ? [i + 1] : [])) : [];
    if (disabled.length) {
      const msg = `Array "${found.array.name}" (revision ${rev.revision}) has disabled element(s) ${disabled.join(', ')}; a bearing–time record needs the full uniform line. Enable them or give array {elements, spacingM}.`;
      throw new ApiError('validation_failed', msg, { fields: { arrayId: [msg] } });
    }
    if (!(rev.frequencyHz && rev.frequencyHz > 0) || !(rev.propagationSpeedMps && rev.propagationSpeedMps > 0)) {
      const msg = `Array "${found.array.name}" (revision ${rev.revision}) has no design frequency and propagation speed, so its spacing in metres is unknown; give array {elements, spacingM} and propagationSpeedMps instead.`;
      throw new ApiError('validation_failed', msg, { fields: { arrayId: [msg] } });
    }
    const spacingM = (rev.spacingWavelengths * rev.propagationSpeedMps) / rev.frequencyHz;
    return {
      array: {
        elements: rev.elements,
        spacingM,
        arrayId: found.array.id,
        arrayRevisionId: rev.id,
        revision: rev.revision,
        name: found.array.name,
      },
      speed: input.propagationSpeedMps ?? rev.propagationSpeedMps,
    };
  }
  const a = input.array!;
  const speed = input.propagationSpeedMps ?? BTR_DEFAULTS.propagationSpeedMps;
  // Spacing in wavelengths is taken at the top of the band: d = spacingWavelengths·c/highHz metres.
  const spacingM = a.spacingM ?? (a.spacingWavelengths! * speed) / input.band.highHz;
  return { array: { elements: a.elements, spacingM }, speed };
}

/**
 * Everything a record needs, checked against the recording's header: the dataset
 * (team-scoped, WAV or NPY), the array, the options (planWideband) and at least one
 * whole block. Throws ApiError (404/415/422) naming the field; nothing is stored.
 */
export async function resolveBtrInputs(caller: Caller, input: BearingTimeRecordRequest): Promise<BtrInputs> {
  await getDb();
  const dataset = await Dataset.findOne({ where: { id: input.datasetId, teamId: caller.teamId } });
  if (!dataset) throw new ApiError('not_found', `No dataset with id ${input.datasetId} in your team.`);
  if (dataset.format !== 'wav' && dataset.format !== 'npy') {
    const msg = `dataset ${dataset.id} ("${dataset.name}") is ${dataset.format.toUpperCase()}; a bearing–time record reads a time series: WAV, or NPY of shape (samples, channels) with sampleRate`;
    throw new ApiError('validation_failed', `datasetId: ${msg}`, { fields: { datasetId: [msg] } });
  }
  const { array, speed } = await resolveArray(caller, input);
  const arrayGiven = input.array !== undefined;
  const format = dataset.format as TimeSeriesFormat;
  const datasetOptions = (dataset.options ?? {}) as { sampleRate?: unknown };
  const sampleRate =
    format === 'npy'
      ? (input.sampleRate ?? (typeof datasetOptions.sampleRate === 'number' ? datasetOptions.sampleRate : undefined))
      : undefined;
  if (format === 'npy' && sampleRate === undefined) {
    const msg = 'an NPY recording has no sample rate in its file; give sampleRate in Hz';
    throw new ApiError('validation_failed', `sampleRate: ${msg}`, { fields: { sampleRate: [msg] } });
  }
  const options = widebandOptionsOf(input, array, speed);
  let recording: BtrInputs['recording'];
  let blocks: number;
  try {
    // Only the header is read here: on a shared store, by ranges (no download on the web process).
    const source = await openTimeSeries({
      path: await storedBytes(dataset.storagePath),
      format,
      fileName: dataset.originalName,
      maxBytes: Math.max(maxUploadBytes(), Number(dataset.bytes)),
      ...(sampleRate !== undefined ? { sampleRate } : {}),
    });
    await source.close();
    recording = {
      sampleRate: source.sampleRate,
      channels: source.channels,
      samplesPerChannel: source.samplesPerChannel,
      durationS: source.samplesPerChannel / source.sampleRate,
    };
    const plan = planWideband(options, { sampleRate: source.sampleRate, channels: source.channels });
    blocks = blockCount(plan, source.samplesPerChannel);
    if (blocks === 0) {
      throw new WidebandInputError(
        'blockSeconds',
        `the recording lasts ${recording.durationS.toFixed(3)} s, shorter than one block of ${input.blockSeconds} s`,
      );
    }
  } catch (err) {
    const mapped = btrErrorToApi(err, arrayGiven);
    if (mapped instanceof ApiError) throw mapped;
    if ((err as NodeJS.ErrnoException)?.code === 'ENOENT') {
      const msg = `the stored file of dataset ${dataset.id} is missing`;
      throw new ApiError('validation_failed', `datasetId: ${msg}`, { fields: { datasetId: [msg] } });
    }
    throw err;
  }
  return {
    request: input,
    options,
    dataset: {
      id: dataset.id,
      name: dataset.name,
      format,
      originalName: dataset.originalName,
      storagePath: dataset.storagePath,
      sha256: dataset.sha256,
      bytes: Number(dataset.bytes),
    },
    recording,
    array,
    blockCount: blocks,
  };
}

/**
 * Validates (4xx naming the field), stores the record as queued and puts it on the
 * job queue. Returns the stored record and the job's promise (the seed waits on it).
 */
export async function createBearingTimeRecord({
  caller,
  input,
}: {
  caller: Caller;
  input: BearingTimeRecordRequest;
}): Promise<{ id: number; status: BearingTimeRecord['status']; done: Promise<void> }> {
  assertPermission(caller, 'estimates.run');
  const inputs = await resolveBtrInputs(caller, input);
  const db = await getDb();
  const name = input.name || `${inputs.dataset.name} — ${input.method} ${input.band.lowHz}–${input.band.highHz} Hz`;
  const { row, job } = await db.transaction(async (transaction) => {
    const created = await BearingTimeRecord.create(
      {
        teamId: caller.teamId,
        name: name.slice(0, 200),
        status: 'queued',
        datasetId: inputs.dataset.id,
        datasetSha256: inputs.dataset.sha256,
        arrayRevisionId: inputs.array.arrayRevisionId ?? null,
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
        action: 'bearing-time-record.started',
        target: created.name,
        detail: { id: created.id, datasetId: inputs.dataset.id },
      },
      transaction,
    );
    const queued = await enqueueJob({
      kind: BTR_JOB,
      inputRef: String(created.id),
      teamId: caller.teamId,
      ownerId: caller.id,
      transaction,
    });
    return { row: created, job: queued };
  });
  const done = waitForJob(job.id).then(() => undefined);
  return { id: row.id, status: row.status, done };
}

/** Splits `total` blocks into at most `parts` consecutive shares of at least MIN_BLOCKS_PER_SHARE. */
export function splitBlocks(total: number, parts: number): { first: number; count: number }[] {
  const n = Math.max(1, Math.min(parts, Math.floor(total / MIN_BLOCKS_PER_SHARE)));
  const out: { first: number; count: number }[] = [];
  for (let i = 0; i < n; i++) {
    const first = Math.round((i * total) / n);
    const next = Math.round(((i + 1) * total) / n);
    out.push({ first, count: next - first });
  }
  return out;
}

/**
 * The job kind: the row is its input. The blocks are split into one share per
 * pool thread (blockRange of bearingTimeRecord, each share seeking in the file);
 * the shares are joined in order, the tracks formed over the whole record, the
 * files written and the row updated. A cancel (Stop, DELETE) aborts every share,
 * which stops their threads. The same inputs give the same result.
 */
registerJobKind<{ summary: BtrSummary; folder: { abs: string; rel: string } } | null>({
  kind: BTR_JOB,
  maxAttempts: 2,
  async run({ job, signal, setProgress }) {
    const row = await BearingTimeRecord.findByPk(Number(job.inputRef));
    if (!row) return null;
    const started = Date.now();
    const inputs = row.inputs as unknown as BtrInputs;
    const dataset = await Dataset.findByPk(inputs.dataset.id);
    if (!dataset || dataset.sha256 !== inputs.dataset.sha256) {
      throw new ApiError('conflict', `The recording (dataset ${inputs.dataset.id}) was deleted or replaced.`);
    }
    const shares = splitBlocks(inputs.blockCount, poolSize());
    const fractions = shares.map(() => 0);
    const report = () => {
      let done = 0;
      for (let i = 0; i < shares.length; i++) done += fractions[i] * shares[i].count;
      setProgress((0.97 * done) / inputs.blockCount);
    };
    const base: Omit<BtrBlocksInput, 'blockRange'> = {
      // A worker on another machine fetches the recording from the shared store first (lib/storage/shared.ts).
      path: await ensureLocalFile(dataset.storagePath),
      format: inputs.dataset.format,
      fileName: inputs.dataset.originalName,
      maxBytes: Math.max(maxUploadBytes(), Number(dataset.bytes)),
      options: inputs.options,
      ...(inputs.dataset.format === 'npy' ? { sampleRate: inputs.recording.sampleRate } : {}),
    };
    const parts = await Promise.all(
      shares.map((blockRange, i) =>
        runCompute(
          'btr.blocks',
          { ...base, blockRange },
          {
            signal,
            onProgress: (f) => {
              fractions[i] = f;
              report();
            },
          },
        ),
      ),
    );
    // Stopped or deleted while the last share finished: write nothing.
    if (signal.aborted) throw signal.reason ?? new Error('aborted');
    const folder = resultFolder(row.teamId as number, row.id);
    // The files are the same for the same inputs, so a second worker re-running a job (its first was thought
    // dead) rewrites the same bytes; the row is written once, by `store`.
    const summary = await finishRecord({ parts, inputs, folder: folder.abs, started });
    return { summary, folder };
  },
  // The summary and the files' folder in the transaction that marks the job done (only while this process
  // still holds the job: written exactly once with several workers).
  async store({ job, value, transaction }) {
    if (!value) return;
    const [updated] = await BearingTimeRecord.update(
      { summary: value.summary as unknown as Record<string, unknown>, resultPath: value.folder.rel, error: null },
      { where: { id: Number(job.inputRef) }, transaction },
    );
    // Deleted while the files were written: leave nothing behind.
    if (updated === 0) await fs.promises.rm(value.folder.abs, { recursive: true, force: true });
  },
  // Stopped or deleted while the files were written (after the last check of the signal): remove
  // them unless another worker has since taken the job (the row is running again) or stored it.
  async discard({ job, value }) {
    if (!value) return;
    const row = await BearingTimeRecord.findByPk(Number(job.inputRef));
    if (row && (row.resultPath || row.status === 'running' || row.status === 'queued')) return;
    await fs.promises.rm(value.folder.abs, { recursive: true, force: true, maxRetries: 5, retryDelay: 20 });
  },
  async onState({ inputRef, status, progress, error }) {
    await BearingTimeRecord.update({ status, progress, error }, { where: { id: Number(inputRef) } });
  },
  describeError(err) {
    const mapped = btrErrorToApi(err);
    if (mapped instanceof ApiError) return mapped.message;
    console.error('[steerwise] bearing–time record failed', err);
    return 'The bearing–time record failed on the server; the detail has been logged.';
  },
});

async function findRecord(caller: Caller, id: number): Promise<BearingTimeRecord> {
  await getDb();
  const row = await BearingTimeRecord.findOne({ where: { id, teamId: caller.teamId } });
  if (!row) throw new ApiError('not_found', `No bearing–time record with id ${id} in your team.`);
  return row;
}

function resultFile(row: BearingTimeRecord, name: string): string | null {
  if (!row.resultPath) return null;
  return path.join(resolveStoragePath(row.resultPath), name);
}

async function readJsonFile<T>(file: string | null, fallback: T): Promise<T> {
  if (!file) return fallback;
  try {
    return JSON.parse(await fs.promises.readFile(file, 'utf8')) as T;
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return fallback;
    throw err;
  }
}

export async function getBearingTimeRecord({ caller, id }: { caller: Caller; id: number }): Promise<BtrDto> {
  assertPermission(caller, 'datasets.read');
  const row = await findRecord(caller, id);
  const creator = row.createdById ? await User.findByPk(row.createdById as number) : null;
  const summary = (row.summary ?? null) as BtrSummary | null;
  const done = row.status === 'done' && summary !== null;
  const blocks = done ? await readJsonFile<BtrBlockDto[]>(resultFile(row, 'blocks.json'), []) : [];
  const image = done ? await readJsonFile<BtrImageDto | null>(resultFile(row, 'image.json'), null) : null;
  let rest: Omit<BtrSummary, 'tracks'> | null = null;
  if (summary) {
    const { tracks: _tracks, ...others } = summary;
    void _tracks;
    rest = others;
  }
  return {
    id: row.id,
    name: row.name,
    status: row.status,
    progress: row.progress,
    error: row.error ?? null,
    datasetId: (row.datasetId as number | null) ?? null,
    arrayRevisionId: (row.arrayRevisionId as number | null) ?? null,
    inputs: row.inputs as unknown as BtrInputs,
    softwareVersion: row.softwareVersion,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
    createdBy: creator ? { id: creator.id, name: creator.name } : null,
    blocks,
    tracks: done ? summary.tracks : [],
    image,
    summary: rest,
  };
}

export async function listBearingTimeRecords({
  caller,
  limit = 100,
}: {
  caller: Caller;
  limit?: number;
}): Promise<BtrListItem[]> {
  assertPermission(caller, 'datasets.read');
  await getDb();
  const rows = await BearingTimeRecord.findAll({
    where: { teamId: caller.teamId },
    include: [{ model: User, as: 'createdBy', attributes: ['id', 'name'] }],
    order: [
      ['createdAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit,
  });
  return rows.map((r) => {
    const inputs = r.inputs as unknown as BtrInputs;
    const summary = (r.summary ?? null) as BtrSummary | null;
    const creator = (r as unknown as { createdBy?: User | null }).createdBy ?? null;
    return {
      id: r.id,
      name: r.name,
      status: r.status,
      progress: r.progress,
      error: r.error ?? null,
      datasetId: (r.datasetId as number | null) ?? null,
      datasetName: inputs.dataset.name,
      method: inputs.options.method,
      band: inputs.options.band,
      durationS: inputs.recording.durationS,
      blockCount: inputs.blockCount,
      trackCount: summary ? summary.tracks.length : null,
      arrayLabel: inputs.array.name
        ? `${inputs.array.name} r${inputs.array.revision}`
        : `${inputs.array.elements} × ${round(inputs.array.spacingM, 4)} m`,
      createdAt: r.createdAt.toISOString(),
      createdBy: creator ? { id: creator.id, name: creator.name } : null,
    };
  });
}

/** One block's wideband spectrum (dB on the grid) and bearings, for the page's click-a-block. */
export async function getBearingTimeRecordBlock({
  caller,
  id,
  index,
}: {
  caller: Caller;
  id: number;
  index: number;
}): Promise<BtrBlockDto & { spectrum: { bearingsDeg: number[]; levelsDb: number[] } }> {
  assertPermission(caller, 'datasets.read');
  const row = await findRecord(caller, id);
  const summary = (row.summary ?? null) as BtrSummary | null;
  if (row.status !== 'done' || !summary || !row.resultPath) {
    throw new ApiError('conflict', `Bearing–time record ${id} is ${row.status}; its blocks exist once it is done.`);
  }
  if (index >= summary.blockCount) {
    throw new ApiError(
      'not_found',
      `Bearing–time record ${id} has ${summary.blockCount} blocks (0 … ${summary.blockCount - 1}); no block ${index}.`,
    );
  }
  const blocks = await readJsonFile<BtrBlockDto[]>(resultFile(row, 'blocks.json'), []);
  const { count, startDeg, stepDeg } = summary.grid;
  const fh = await fs.promises.open(resultFile(row, 'levels.f32')!, 'r');
  const buf = Buffer.alloc(4 * count);
  try {
    await fh.read(buf, 0, buf.length, 4 * count * index);
  } finally {
    await fh.close();
  }
  const levelsDb: number[] = [];
  const bearingsDeg: number[] = [];
  for (let i = 0; i < count; i++) {
    levelsDb.push(round(buf.readFloatLE(4 * i), 3));
    bearingsDeg.push(round(startDeg + i * stepDeg, 6));
  }
  return { ...blocks[index], spectrum: { bearingsDeg, levelsDb } };
}

/** The full-resolution image rows of a finished record (for the PNG export). */
export async function readLevels(
  row: BearingTimeRecord,
): Promise<{ levels: Float32Array; rows: number; grid: BtrSummary['grid'] }> {
  const summary = row.summary as unknown as BtrSummary;
  const bytes = await fs.promises.readFile(resultFile(row, 'levels.f32')!);
  const levels = new Float32Array(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength));
  return { levels, rows: summary.blockCount, grid: summary.grid };
}

/** A finished record of the caller's team (for exports): 409 while it is not done. */
export async function findFinishedRecord({ caller, id }: { caller: Caller; id: number }): Promise<BearingTimeRecord> {
  assertPermission(caller, 'datasets.read');
  const row = await findRecord(caller, id);
  if (row.status !== 'done' || !row.summary || !row.resultPath) {
    throw new ApiError('conflict', `Bearing–time record ${id} is ${row.status}; it can be exported once it is done.`);
  }
  return row;
}

/** Deletes a record and its files (engineers, admins); a running one is stopped first. */
export async function deleteBearingTimeRecord({ caller, id }: { caller: Caller; id: number }): Promise<void> {
  assertPermission(caller, 'estimates.run');
  const row = await findRecord(caller, id);
  const job = await latestJob(BTR_JOB, String(id));
  if (job) await cancelJob(job.id, 'The bearing–time record was deleted while it ran.');
  const db = await getDb();
  await db.transaction(async (transaction) => {
    await row.destroy({ transaction });
    await recordAudit(
      {
        teamId: caller.teamId,
        userId: caller.id,
        action: 'bearing-time-record.deleted',
        target: row.name,
        detail: { id },
      },
      transaction,
    );
  });
  const folder = resultFolder(row.teamId as number, row.id);
  // A job that is still writing the folder may add a file while it is removed (ENOTEMPTY): retried,
  // and if it still fails the record is gone all the same; the job removes what it wrote (`discard`).
  await fs.promises.rm(folder.abs, { recursive: true, force: true, maxRetries: 5, retryDelay: 20 }).catch((err) => {
    console.error('[steerwise] bearing–time record files left for the job to remove', folder.rel, err);
  });
}

/** Stops a queued or running record (engineers, admins); 409 when it has already ended. */
export async function cancelBearingTimeRecord({ caller, id }: { caller: Caller; id: number }): Promise<BtrDto> {
  assertPermission(caller, 'estimates.run');
  const row = await findRecord(caller, id);
  const stopped = await stopRecordJob(BTR_JOB, id, caller.name);
  if (!stopped) {
    const now = await BearingTimeRecord.findByPk(id);
    throw new ApiError(
      'conflict',
      `Bearing–time record ${id} is ${now?.status ?? row.status}; only a queued or running record can be stopped.`,
    );
  }
  await recordAudit({
    teamId: caller.teamId,
    userId: caller.id,
    action: 'bearing-time-record.cancelled',
    target: row.name,
    detail: { id },
  });
  return getBearingTimeRecord({ caller, id });
}

/** Result folders under bearing-time-records/ whose record no longer exists (the start-up sweep). */
export async function isBtrFileReferenced(relative: string): Promise<boolean> {
  const parts = relative.split(path.sep);
  const id = Number(parts[2]);
  if (!Number.isInteger(id)) return false;
  return (await BearingTimeRecord.count({ where: { id } })) > 0;
}

export function btrFilesDir(): string {
  return btrRoot();
}
