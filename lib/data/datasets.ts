import 'server-only';
import fs from 'node:fs';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { ArrayDesign, ArrayRevision, Dataset, User } from '@/models';
import { ApiError } from '../http';
import { assertPermission, type Caller } from '../auth';
import { recordAudit } from './record-audit';
import { getDb } from '../db';
import {
  DatasetError,
  detectFormat,
  parseSnapshotFile,
  type ParsedSnapshots,
  type ParseOptions,
  type SnapshotFormat,
} from '../datasets';
import { summarise, type DatasetSummary } from '../storage/summary';
import { datasetsDir, removeQuietly, resolveStoragePath } from '../storage/files';
import { ensureLocalFile, publishStoredFile, unpublishStoredFile } from '../storage/shared';
import { formatBytes, receiveFile, type ReceivedFile } from '../http/multipart';
import { enqueueJob, registerJobKind, waitForJob } from '../jobs';
import { runCompute } from '../jobs/pool';
import type { DatasetParseInput, DatasetParseOutput } from '../jobs/compute';
import { datasetUploadFieldsSchema } from '../validations/dataset';

export { summarise, type DatasetSummary };
import { dataDir, maxUploadBytes } from '../env';

export interface DatasetDto {
  id: number;
  name: string;
  format: SnapshotFormat;
  elements: number;
  snapshots: number;
  sha256: string;
  bytes: number;
  originalName: string;
  arrayId: number | null;
  options: Record<string, unknown> | null;
  details: Record<string, unknown> | null;
  uploadedBy: { id: number; name: string } | null;
  createdAt: string;
  summary: DatasetSummary | null;
}

export type DatasetListItem = Omit<DatasetDto, 'summary' | 'details' | 'options'>;

function toDto(d: Dataset, uploader: User | null, withSummary: boolean): DatasetDto {
  const details = (d.details ?? null) as (Record<string, unknown> & { summary?: DatasetSummary }) | null;
  const { summary, ...rest } = details ?? {};
  return {
    id: d.id,
    name: d.name,
    format: d.format,
    elements: d.elements,
    snapshots: d.snapshots,
    sha256: d.sha256,
    bytes: Number(d.bytes),
    originalName: d.originalName,
    arrayId: (d.arrayId as number | null) ?? null,
    options: d.options ?? null,
    details: details ? rest : null,
    uploadedBy: uploader ? { id: uploader.id, name: uploader.name } : null,
    createdAt: d.createdAt.toISOString(),
    summary: withSummary ? (summary ?? null) : null,
  };
}

/** The created answer of POST /api/v1/datasets (docs/conventions.md §7). */
export function createdBody(d: DatasetDto) {
  return { id: d.id, name: d.name, format: d.format, elements: d.elements, snapshots: d.snapshots, sha256: d.sha256 };
}

/** The latest revision of an array of the caller's team, or 404. */
/** An array of the caller's team at its latest revision, or at `revision` when given (404 when either is missing). */
export async function findTeamArrayRevision({
  caller,
  arrayId,
  revision: wanted,
}: {
  caller: Caller;
  arrayId: number;
  revision?: number;
}): Promise<{ array: ArrayDesign; revision: ArrayRevision }> {
  await getDb();
  const array = await ArrayDesign.findOne({ where: { id: arrayId, teamId: caller.teamId } });
  if (!array) throw new ApiError('not_found', `No array with id ${arrayId} in your team.`);
  const revision = await ArrayRevision.findOne({
    where: { arrayId: array.id, revision: wanted ?? array.latestRevision },
  });
  if (!revision) {
    throw new ApiError(
      'not_found',
      wanted === undefined
        ? `Array ${arrayId} has no saved revision.`
        : `Array ${arrayId} has no revision ${wanted} (its latest is ${array.latestRevision}).`,
    );
  }
  return { array, revision };
}

/** A DatasetError as the v1 error body (with its reader code and location). */
export function datasetErrorToApi(err: DatasetError): ApiError | null {
  if (err.status === 500) return null;
  const code = err.status === 413 ? 'too_large' : err.status === 415 ? 'unsupported_format' : 'validation_failed';
  const where = err.location
    ? [
        err.location.row !== undefined ? `row ${err.location.row}` : '',
        err.location.column !== undefined ? `column ${err.location.column}` : '',
      ]
        .filter(Boolean)
        .join(', ')
    : '';
  // The reader's stable code and the 1-based location travel in `fields`, the one open slot of the §7 error body.
  const fields: Record<string, string[]> = { file: [err.message], reason: [err.code] };
  if (where) fields.location = [where];
  return new ApiError(code, err.message, { fields });
}

function parseOptionsOf(fields: ReturnType<typeof datasetUploadFieldsSchema.parse>): Omit<ParseOptions, 'path'> {
  const o: Omit<ParseOptions, 'path'> = {};
  if (fields.datasetPath !== undefined) o.datasetPath = fields.datasetPath;
  if (fields.frequencyHz !== undefined) o.frequencyHz = fields.frequencyHz;
  if (fields.fftLength !== undefined) o.fftLength = fields.fftLength;
  if (fields.hop !== undefined) o.hop = fields.hop;
  if (fields.window !== undefined) o.window = fields.window;
  return o;
}

/**
 * Reads the dataset upload of POST /api/v1/datasets (multipart `file` plus the
 * optional fields of datasetUploadFieldsSchema) into a temp file, under
 * STEERWISE_MAX_UPLOAD_BYTES. The caller removes the temp file in `finally`.
 */
export function receiveDatasetUpload(req: Request): Promise<ReceivedFile> {
  return receiveFile(req, {
    noun: 'dataset',
    maxBytes: maxUploadBytes(),
    tooLarge: (max) =>
      new ApiError('too_large', `The file is larger than the upload limit of ${formatBytes(max)} (${max} bytes).`),
  });
}

/**
 * Parses a received upload and stores it: the temp file is renamed into
 * datasets/<team>/ and the row inserted in one transaction. On any failure
 * neither the row nor a file remains (the caller deletes the temp file).
 */
export async function createDataset({ caller, upload }: { caller: Caller; upload: ReceivedFile }): Promise<DatasetDto> {
  assertPermission(caller, 'datasets.upload');
  const fields = datasetUploadFieldsSchema.parse(upload.fields);
  const format = detectFormat(upload.originalName);
  let target: { array: ArrayDesign; revision: ArrayRevision } | null = null;
  if (fields.arrayId !== undefined) target = await findTeamArrayRevision({ caller, arrayId: fields.arrayId });
  const options = parseOptionsOf(fields);
  const parsed = await parseUpload({
    caller,
    input: {
      path: upload.tempPath,
      fileName: upload.originalName,
      format,
      maxBytes: maxUploadBytes(),
      parseOptions: options,
    },
  });
  if (target && target.revision.elements !== parsed.elements) {
    throw new ApiError(
      'validation_failed',
      `The file has ${parsed.elements} columns (elements) but array "${target.array.name}" (revision ${target.revision.revision}) has ${target.revision.elements} elements; they must match.`,
      { fields: { arrayId: [`array has ${target.revision.elements} elements, the file has ${parsed.elements}`] } },
    );
  }
  const summary = parsed.summary;
  const name = fields.name ?? upload.originalName.replace(/\.[A-Za-z0-9]+$/, '').slice(0, 200) ?? 'dataset';
  const ext = path.extname(upload.originalName).toLowerCase();
  const rel = path.join('datasets', String(caller.teamId), `${randomUUID()}${ext}`);
  const finalPath = resolveStoragePath(rel);
  await fs.promises.mkdir(path.dirname(finalPath), { recursive: true });
  const db = await getDb();
  let moved = false;
  try {
    const row = await db.transaction(async (transaction) => {
      const created = await Dataset.create(
        {
          teamId: caller.teamId,
          name: name || 'dataset',
          format: parsed.format,
          elements: parsed.elements,
          snapshots: parsed.snapshots,
          sha256: upload.sha256,
          bytes: upload.bytes,
          originalName: upload.originalName.slice(0, 255),
          storagePath: rel,
          arrayId: target ? target.array.id : null,
          options: Object.keys(options).length ? (options as Record<string, unknown>) : null,
          details: {
            ...(parsed.details as unknown as Record<string, unknown>),
            ...(parsed.sampleRate ? { sampleRate: parsed.sampleRate } : {}),
            summary,
          },
          uploadedById: caller.id,
        },
        { transaction },
      );
      await recordAudit(
        {
          teamId: caller.teamId,
          userId: caller.id,
          action: 'dataset.uploaded',
          target: created.name,
          detail: { id: created.id, sha256: upload.sha256, bytes: upload.bytes, format: parsed.format },
        },
        transaction,
      );
      await fs.promises.rename(upload.tempPath, finalPath);
      moved = true;
      // The shared store (S3) gets the file before the row commits; a no-op on local disk.
      await publishStoredFile(rel);
      return created;
    });
    const uploader = await User.findByPk(caller.id);
    return toDto(row, uploader, true);
  } catch (err) {
    if (moved) await removeQuietly(finalPath);
    throw err;
  }
}

export const DATASET_PARSE_JOB = 'dataset.parse';

/**
 * Parsing an upload and computing its summary: a transient job (it belongs to
 * the request that waits for it, which holds its input) whose compute runs in
 * a worker thread, so a 100 MB parse never holds the web thread. A refusal of
 * the reader comes back as the reader's DatasetError.
 */
registerJobKind<DatasetParseOutput>({
  kind: DATASET_PARSE_JOB,
  maxAttempts: 1,
  transient: true,
  async run({ job, localInput, signal, setProgress }) {
    if (!localInput) throw new Error(`the input of dataset parse job ${job.id} is not held by this process`);
    return runCompute('dataset.parse', localInput as DatasetParseInput, { signal, onProgress: setProgress });
  },
  describeError(err) {
    return err instanceof DatasetError
      ? err.message
      : 'The file could not be parsed on the server; the detail has been logged.';
  },
});

async function parseUpload({
  caller,
  input,
}: {
  caller: Caller;
  input: DatasetParseInput;
}): Promise<DatasetParseOutput> {
  const job = await enqueueJob({
    kind: DATASET_PARSE_JOB,
    inputRef: path.relative(dataDir(), input.path),
    teamId: caller.teamId,
    ownerId: caller.id,
    localInput: input,
  });
  const outcome = await waitForJob<DatasetParseOutput>(job.id);
  if (outcome.status === 'done' && outcome.value) return outcome.value;
  if (outcome.cause !== undefined) throw outcome.cause;
  throw new ApiError('conflict', outcome.error ?? 'The file could not be parsed.');
}

export async function getDataset({ caller, id }: { caller: Caller; id: number }): Promise<DatasetDto> {
  assertPermission(caller, 'datasets.read');
  await getDb();
  const d = await Dataset.findOne({ where: { id, teamId: caller.teamId } });
  if (!d) throw new ApiError('not_found', `No dataset with id ${id} in your team.`);
  const uploader = d.uploadedById ? await User.findByPk(d.uploadedById as number) : null;
  return toDto(d, uploader, true);
}

export async function listDatasets({ caller }: { caller: Caller }): Promise<DatasetListItem[]> {
  assertPermission(caller, 'datasets.read');
  await getDb();
  const rows = await Dataset.findAll({
    where: { teamId: caller.teamId },
    order: [
      ['createdAt', 'DESC'],
      ['id', 'DESC'],
    ],
    include: [{ model: User, as: 'uploadedBy' }],
  });
  return rows.map((d) => {
    const {
      summary: _s,
      details: _d,
      options: _o,
      ...rest
    } = toDto(d, (d as unknown as { uploadedBy: User | null }).uploadedBy ?? null, false);
    return rest;
  });
}

/** Deletes the row (runs keep their stored checksum; their datasetId becomes null) and then the file. */
export async function deleteDataset({ caller, id }: { caller: Caller; id: number }): Promise<void> {
  assertPermission(caller, 'datasets.upload');
  const db = await getDb();
  const storagePath = await db.transaction(async (transaction) => {
    const d = await Dataset.findOne({ where: { id, teamId: caller.teamId }, transaction });
    if (!d) throw new ApiError('not_found', `No dataset with id ${id} in your team.`);
    await recordAudit(
      {
        teamId: caller.teamId,
        userId: caller.id,
        action: 'dataset.deleted',
        target: d.name,
        detail: { id: d.id, sha256: d.sha256 },
      },
      transaction,
    );
    await d.destroy({ transaction });
    return d.storagePath;
  });
  await removeQuietly(resolveStoragePath(storagePath));
  await unpublishStoredFile(storagePath);
}

/** The stored dataset's snapshots, re-read from its file (server side, for estimate runs). */
export async function loadDatasetSnapshots({
  caller,
  id,
  onProgress,
}: {
  caller: Caller;
  id: number;
  onProgress?: ParseOptions['onProgress'];
}): Promise<{ dataset: Dataset; parsed: ParsedSnapshots }> {
  assertPermission(caller, 'datasets.read');
  await getDb();
  const dataset = await Dataset.findOne({ where: { id, teamId: caller.teamId } });
  if (!dataset) throw new ApiError('not_found', `No dataset with id ${id} in your team.`);
  const file = await ensureLocalFile(dataset.storagePath);
  const parsed = await parseSnapshotFile({
    path: file,
    format: dataset.format,
    fileName: dataset.originalName,
    maxBytes: Math.max(maxUploadBytes(), Number(dataset.bytes)),
    ...((dataset.options ?? {}) as Omit<ParseOptions, 'path'>),
    onProgress,
  });
  return { dataset, parsed };
}

/** Files under datasets/ and uploads/tmp/ (tests and operators check for orphans with it). */
export function listStoredFiles(): string[] {
  const out: string[] = [];
  const walk = (dir: string) => {
    let entries: fs.Dirent[];
    try {
      entries = fs.readdirSync(dir, { withFileTypes: true });
    } catch {
      return;
    }
    for (const e of entries) {
      const full = path.join(dir, e.name);
      if (e.isDirectory()) walk(full);
      else out.push(path.relative(dataDir(), full));
    }
  };
  walk(datasetsDir());
  walk(path.join(dataDir(), 'uploads'));
  return out.sort();
}

export interface ArrayChoice {
  id: number;
  name: string;
  revision: number;
  revisionId: number;
  elements: number;
  spacingWavelengths: number;
  disabledElements: number[];
  /** Some element has a gain or phase other than 0 dB, 0° (the estimate form offers to apply it). */
  calibrated: boolean;
}

/** The team's arrays at their latest revision (or every revision, newest first, with `allRevisions`), for the upload, estimate and study forms. */
export async function listArrayChoices({
  caller,
  allRevisions = false,
}: {
  caller: Caller;
  allRevisions?: boolean;
}): Promise<ArrayChoice[]> {
  assertPermission(caller, 'arrays.read');
  await getDb();
  const arrays = await ArrayDesign.findAll({ where: { teamId: caller.teamId }, order: [['name', 'ASC']] });
  const out: ArrayChoice[] = [];
  for (const a of arrays) {
    const revisions = allRevisions
      ? await ArrayRevision.findAll({ where: { arrayId: a.id }, order: [['revision', 'DESC']] })
      : await ArrayRevision.findAll({ where: { arrayId: a.id, revision: a.latestRevision } });
    for (const r of revisions) out.push(arrayChoiceOf(a, r));
  }
  return out;
}

function arrayChoiceOf(a: ArrayDesign, r: ArrayRevision): ArrayChoice {
  const states = (r.config as { elementStates?: { enabled?: boolean; gainDb?: number; phaseDeg?: number }[] })
    .elementStates;
  const disabledElements = Array.isArray(states)
    ? states.flatMap((s, i) => (s && s.enabled === false ? [i + 1] : []))
    : [];
  const calibrated = Array.isArray(states) && states.some((s) => s && (Number(s.gainDb) || Number(s.phaseDeg)));
  return {
    id: a.id,
    name: a.name,
    revision: r.revision,
    revisionId: r.id,
    elements: r.elements,
    spacingWavelengths: r.spacingWavelengths,
    disabledElements,
    calibrated,
  };
}
