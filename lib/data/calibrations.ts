import 'server-only';
import { Transaction } from 'sequelize';
import { ArrayDesign, ArrayRevision, Calibration, Dataset, Job, User } from '@/models';
import { ApiError } from '../http';
import { assertPermission, type Caller } from '../auth';
import { recordAudit } from './record-audit';
import { getDb } from '../db';
import { DatasetError } from '../datasets';
import { DoaInputError, DoaNumericalError } from '../doa';
import { CalibrationInputError, type CalibrationReport, type CalibrationResult } from '../doa/calibration/report';
import type { ElementGainState } from '../doa/calibration/gains';
import { enqueueJob, registerJobKind, waitForJob, type JobContext } from '../jobs';
import type { CalibrationComputeInput, SnapshotSource } from '../jobs/compute';
import { runCompute } from '../jobs/pool';
import { maxUploadBytes } from '../env';
import { ensureLocalFile } from '../storage/shared';
import { SOFTWARE_VERSION } from '../version';
import { mergeArrayInput, revisionColumns, validateArrayInput } from '../validations/array-save';
import type { ArrayInput } from '../validations/array';
import { referenceField, referencesOf, type CalibrationRequest } from '../validations/calibration';
import { datasetErrorToApi, findTeamArrayRevision } from './datasets';
import { getArray, type ArrayDetailDto } from './arrays';

/**
 * Calibrations of an array from reference recordings (issue "Imperfect arrays", item 1).
 *
 * POST runs the fit as a job of kind `calibration` on the worker pool and, by default,
 * waits for it and creates the new array revision at once (the 201 answer holds it).
 * With `accept: false` the result is a proposal: the panel shows the report, and
 * POST …/calibrations/{id}/accept creates the revision later. With
 * `Prefer: respond-async` the answer is 202 with the queued calibration (a proposal;
 * `accept: true` is refused there), polled through GET …/calibrations/{id}.
 *
 * Everything the request can get wrong is refused with 422 before anything is stored
 * (unknown fields, bearings outside ±90°, a dataset whose channel count differs from the
 * array's, fewer snapshots than elements, too many bearings); a reference the fit finds
 * without a signal at a bearing given is refused with 422 after the fit, and the
 * calibration and its job rows are removed, so nothing is left stored.
 */

export const CALIBRATION_JOB = 'calibration';

export interface CalibrationReferenceInput {
  datasetId: number;
  name: string;
  sha256: string;
  format: Dataset['format'];
  snapshots: number;
  bearingsDeg: number[];
  /** WAV: the analysis frequency used. */
  frequencyHz?: number;
  /** The request field prefix of this reference ('' for the single form). */
  field: string;
}

/** What a calibration stores as `inputs`. */
export interface CalibrationInputs {
  request: CalibrationRequest;
  method: CalibrationComputeInput['method'];
  accept: boolean;
  array: { id: number; name: string; revision: number; revisionId: number; elements: number };
  /** The spacing the fit used, in wavelengths at the references' analysis frequency. */
  spacingWavelengths: number;
  analysisFrequencyHz: number | null;
  references: CalibrationReferenceInput[];
}

export interface CalibrationDto {
  id: number;
  arrayId: number;
  status: Calibration['status'];
  progress: number;
  error: string | null;
  method: CalibrationComputeInput['method'];
  /** The revision whose geometry the fit used. */
  baseRevision: number;
  /** The revision created from this calibration, once accepted. */
  acceptedRevision: number | null;
  inputs: CalibrationInputs;
  /** The proposed element states (gain dB, phase ° relative to element 1), when done. */
  elementStates: ElementGainState[] | null;
  report: CalibrationReport | null;
  softwareVersion: string;
  createdAt: string;
  createdBy: { id: number; name: string } | null;
}

async function toDto(row: Calibration): Promise<CalibrationDto> {
  const inputs = row.inputs as unknown as CalibrationInputs;
  const result = (row.result ?? null) as CalibrationResult | null;
  const creator = row.createdById ? await User.findByPk(row.createdById as number) : null;
  const accepted = row.revisionId ? await ArrayRevision.findByPk(row.revisionId as number) : null;
  return {
    id: row.id,
    arrayId: row.arrayId as number,
    status: row.status,
    progress: row.progress,
    error: row.error ?? null,
    method: inputs.method,
    baseRevision: inputs.array.revision,
    acceptedRevision: accepted?.revision ?? null,
    inputs,
    elementStates: result?.states ?? null,
    report: result?.report ?? null,
    softwareVersion: row.softwareVersion,
    createdAt: row.createdAt.toISOString(),
    createdBy: creator ? { id: creator.id, name: creator.name } : null,
  };
}

function refused(field: string, message: string): ApiError {
  return new ApiError('validation_failed', `${field}: ${message}`, { fields: { [field]: [message] } });
}

/** Maps an engine refusal of a reference to the request field it concerns. */
function engineToApi(err: unknown, refs: readonly CalibrationReferenceInput[]): unknown {
  if (err instanceof CalibrationInputError) {
    const prefix = refs[err.reference]?.field ?? '';
    const member = err.bearing !== undefined ? `${err.what}.${err.bearing}` : err.what;
    return refused(referenceField(prefix, member), err.message);
  }
  if (err instanceof DoaInputError || err instanceof DoaNumericalError)
    return new ApiError('validation_failed', `The calibration cannot be computed: ${err.message}.`, {
      fields: { engine: [err.code] },
    });
  if (err instanceof DatasetError) return datasetErrorToApi(err) ?? err;
  return err;
}

function wavFrequency(d: Dataset): number | undefined {
  const f = (d.options as { frequencyHz?: unknown } | null)?.frequencyHz;
  return typeof f === 'number' ? f : undefined;
}

/** Validates the request against the array and the datasets; throws 422/404 before anything is stored. */
async function resolveInputs(caller: Caller, arrayId: number, input: CalibrationRequest, accept: boolean) {
  const { array, revision } = await findTeamArrayRevision({ caller, arrayId });
  const m = revision.elements;
  const refs: CalibrationReferenceInput[] = [];
  const datasets: Dataset[] = [];
  for (const r of referencesOf(input)) {
    const field = referenceField(r.field, 'datasetId');
    const dataset = await Dataset.findOne({ where: { id: r.datasetId, teamId: caller.teamId } });
    if (!dataset) throw new ApiError('not_found', `No dataset with id ${r.datasetId} in your team (${field}).`);
    if (dataset.elements !== m)
      throw refused(
        field,
        `dataset "${dataset.name}" has ${dataset.elements} channels but array "${array.name}" (revision ${revision.revision}) has ${m} elements`,
      );
    if (dataset.snapshots < m)
      throw refused(
        field,
        `dataset "${dataset.name}" has ${dataset.snapshots} snapshots, fewer than the ${m} elements; its covariance would be singular`,
      );
    if (r.bearingsDeg.length >= m)
      throw refused(
        referenceField(r.field, 'bearingsDeg'),
        `${r.bearingsDeg.length} bearings given; at most ${m - 1} fit an array of ${m} elements`,
      );
    const frequencyHz = dataset.format === 'wav' ? (input.frequencyHz ?? wavFrequency(dataset)) : undefined;
    datasets.push(dataset);
    refs.push({
      datasetId: dataset.id,
      name: dataset.name,
      sha256: dataset.sha256,
      format: dataset.format,
      snapshots: dataset.snapshots,
      bearingsDeg: r.bearingsDeg,
      ...(frequencyHz !== undefined ? { frequencyHz } : {}),
      field: r.field,
    });
  }
  const wavFrequencies = [...new Set(refs.flatMap((r) => (r.frequencyHz !== undefined ? [r.frequencyHz] : [])))];
  if (wavFrequencies.length > 1)
    throw refused(
      'frequencyHz',
      `the WAV references were analysed at ${wavFrequencies.join(', ')} Hz; a calibration holds for one frequency, so give frequencyHz to analyse them all there`,
    );
  const analysisFrequencyHz = wavFrequencies[0] ?? null;
  // The spacing in wavelengths scales with the analysis frequency when the revision states its own (docs/conventions.md §9).
  const spacingWavelengths =
    analysisFrequencyHz !== null && revision.frequencyHz
      ? (revision.spacingWavelengths * analysisFrequencyHz) / revision.frequencyHz
      : revision.spacingWavelengths;
  const inputs: CalibrationInputs = {
    request: input,
    method: input.method ?? 'known-bearings',
    accept,
    array: { id: array.id, name: array.name, revision: revision.revision, revisionId: revision.id, elements: m },
    spacingWavelengths,
    analysisFrequencyHz,
    references: refs,
  };
  return { array, revision, inputs, datasets };
}

/**
 * Validates and stores a calibration, runs it on the pool and (when `wait`) resolves once
 * done; with `accept` (the default when waiting) the new revision is created at once.
 */
export async function submitCalibration({
  caller,
  arrayId,
  input,
  wait,
}: {
  caller: Caller;
  arrayId: number;
  input: CalibrationRequest;
  wait: boolean;
}): Promise<{ calibration: CalibrationDto; revision: ArrayDetailDto | null }> {
  assertPermission(caller, 'arrays.edit');
  if (!wait && input.accept === true)
    throw refused(
      'accept',
      'a calibration answered at once (Prefer: respond-async) is a proposal; accept it with POST …/calibrations/{id}/accept when done',
    );
  const accept = input.accept ?? wait;
  const db = await getDb();
  const { array, revision, inputs } = await resolveInputs(caller, arrayId, input, accept);
  const { row, job } = await db.transaction(async (transaction) => {
    const created = await Calibration.create(
      {
        teamId: caller.teamId,
        arrayId: array.id,
        baseRevisionId: revision.id,
        status: 'queued',
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
        action: 'calibration.started',
        target: array.name,
        detail: {
          id: created.id,
          arrayId: array.id,
          revision: revision.revision,
          datasets: inputs.references.map((r) => r.datasetId),
        },
      },
      transaction,
    );
    const queued = await enqueueJob({
      kind: CALIBRATION_JOB,
      inputRef: String(created.id),
      teamId: caller.teamId,
      ownerId: caller.id,
      transaction,
    });
    return { row: created, job: queued };
  });
  if (!wait) return { calibration: await getCalibration({ caller, arrayId, id: row.id }), revision: null };
  const outcome = await waitForJob(job.id);
  if (outcome.status === 'failed' && outcome.cause !== undefined) {
    const mapped = engineToApi(outcome.cause, inputs.references);
    if (mapped instanceof ApiError) {
      // A refusal of the data on a waited calibration is answered as 422 and leaves nothing behind.
      await db.transaction(async (transaction) => {
        await Calibration.destroy({ where: { id: row.id }, transaction });
        await Job.destroy({ where: { id: job.id }, transaction });
      });
      throw mapped;
    }
  }
  const done = await Calibration.findByPk(row.id);
  if (accept && done?.status === 'done') return acceptCalibration({ caller, arrayId, id: row.id });
  return { calibration: await getCalibration({ caller, arrayId, id: row.id }), revision: null };
}

/**
 * Creates revision n + 1 of the array with the calibration's element states (the
 * enabled flags, and the gain and phase of disabled elements, stay as in the latest
 * revision). 409 when the calibration is not done, was already accepted, or the array
 * now has a different element count.
 */
export async function acceptCalibration({
  caller,
  arrayId,
  id,
}: {
  caller: Caller;
  arrayId: number;
  id: number;
}): Promise<{ calibration: CalibrationDto; revision: ArrayDetailDto }> {
  assertPermission(caller, 'arrays.edit');
  const db = await getDb();
  await db.transaction({ type: Transaction.TYPES.IMMEDIATE }, async (transaction) => {
    const row = await Calibration.findOne({ where: { id, arrayId, teamId: caller.teamId }, transaction });
    if (!row) throw new ApiError('not_found', `Array ${arrayId} has no calibration ${id}.`);
    if (row.status !== 'done')
      throw new ApiError(
        'conflict',
        `Calibration ${id} is ${row.status}; only a finished calibration can be accepted.`,
      );
    if (row.revisionId) throw new ApiError('conflict', `Calibration ${id} has already been accepted.`);
    const array = await ArrayDesign.findOne({ where: { id: arrayId, teamId: caller.teamId }, transaction });
    if (!array) throw new ApiError('not_found', `No array with id ${arrayId} in your team.`);
    const previous = await ArrayRevision.findOne({
      where: { arrayId, revision: array.latestRevision },
      transaction,
    });
    if (!previous) throw new ApiError('not_found', `Array ${arrayId} has no saved revision.`);
    const states = ((row.result ?? {}) as unknown as CalibrationResult).states;
    if (!states || states.length !== previous.elements)
      throw new ApiError(
        'conflict',
        `Calibration ${id} has ${states?.length ?? 0} elements but the array now has ${previous.elements}; run a new calibration.`,
      );
    const config = previous.config as unknown as ArrayInput;
    const old = config.elementStates;
    const elementStates = states.map((s, i) => {
      const enabled = old?.[i]?.enabled ?? true;
      if (!enabled && old) return old[i];
      return { enabled, gainDb: round(s.gainDb, 4), phaseDeg: round(s.phaseDeg, 3) };
    });
    const { input, geometry } = validateArrayInput(mergeArrayInput(config, { elementStates }));
    const revision = array.latestRevision + 1;
    const created = await ArrayRevision.create(
      { arrayId, revision, authorId: caller.id, ...revisionColumns(input, geometry) },
      { transaction },
    );
    await ArrayDesign.update(
      { latestRevision: revision },
      { where: { id: arrayId, teamId: caller.teamId }, transaction },
    );
    await Calibration.update({ revisionId: created.id }, { where: { id }, transaction });
    await recordAudit(
      {
        teamId: caller.teamId,
        userId: caller.id,
        action: 'array.revised',
        target: array.name,
        detail: { arrayId, revision, changed: ['elementStates'], calibrationId: id, via: caller.via },
      },
      transaction,
    );
    await recordAudit(
      {
        teamId: caller.teamId,
        userId: caller.id,
        action: 'calibration.accepted',
        target: array.name,
        detail: { id, arrayId, revision },
      },
      transaction,
    );
  });
  return {
    calibration: await getCalibration({ caller, arrayId, id }),
    revision: await getArray({ caller, id: arrayId }),
  };
}

function round(v: number, digits: number): number {
  const f = 10 ** digits;
  return Math.round(v * f) / f;
}

export async function getCalibration({
  caller,
  arrayId,
  id,
}: {
  caller: Caller;
  arrayId: number;
  id: number;
}): Promise<CalibrationDto> {
  assertPermission(caller, 'arrays.read');
  await getDb();
  const row = await Calibration.findOne({ where: { id, arrayId, teamId: caller.teamId } });
  if (!row) throw new ApiError('not_found', `Array ${arrayId} has no calibration ${id}.`);
  return toDto(row);
}

export async function listCalibrations({
  caller,
  arrayId,
}: {
  caller: Caller;
  arrayId: number;
}): Promise<CalibrationDto[]> {
  assertPermission(caller, 'arrays.read');
  await getDb();
  const array = await ArrayDesign.findOne({ where: { id: arrayId, teamId: caller.teamId } });
  if (!array) throw new ApiError('not_found', `No array with id ${arrayId} in your team.`);
  const rows = await Calibration.findAll({
    where: { arrayId, teamId: caller.teamId },
    order: [
      ['createdAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: 50,
  });
  return Promise.all(rows.map(toDto));
}

/** Where the worker finds a reference: its stored file, parsed at the calibration's analysis frequency. */
async function referenceSource(row: Calibration, ref: CalibrationReferenceInput): Promise<SnapshotSource> {
  const dataset = await Dataset.findOne({ where: { id: ref.datasetId, teamId: row.teamId as number } });
  if (!dataset)
    throw new ApiError(
      'conflict',
      `The dataset "${ref.name}" (id ${ref.datasetId}) of this calibration has been deleted.`,
    );
  const stored = (dataset.options ?? {}) as Extract<SnapshotSource, { kind: 'file' }>['parseOptions'];
  return {
    kind: 'file',
    // A worker on another machine fetches the recording from the shared store first (lib/storage/shared.ts).
    path: await ensureLocalFile(dataset.storagePath),
    format: dataset.format,
    fileName: dataset.originalName,
    maxBytes: Math.max(maxUploadBytes(), Number(dataset.bytes)),
    parseOptions: { ...stored, ...(ref.frequencyHz !== undefined ? { frequencyHz: ref.frequencyHz } : {}) },
  };
}

/** The calibration job kind: the calibration row is its input; the same inputs give the same result. */
registerJobKind<CalibrationResult | null>({
  kind: CALIBRATION_JOB,
  maxAttempts: 2,
  async run({ job, signal, setProgress }: JobContext) {
    const row = await Calibration.findByPk(Number(job.inputRef));
    if (!row) return null;
    const inputs = row.inputs as unknown as CalibrationInputs;
    const references = [];
    for (const ref of inputs.references)
      references.push({ source: await referenceSource(row, ref), bearingsDeg: ref.bearingsDeg });
    const result = await runCompute(
      'calibration',
      { references, spacingWavelengths: inputs.spacingWavelengths, method: inputs.method },
      { signal, onProgress: setProgress },
    );
    return result;
  },
  // Result and status in one write (onState skips 'done'), in the transaction that marks the job done:
  // with several workers only the one still holding the job stores it.
  async store({ job, value, transaction }) {
    if (!value) return;
    await Calibration.update(
      { result: value as unknown as Record<string, unknown>, status: 'done', progress: 1, error: null },
      { where: { id: Number(job.inputRef) }, transaction },
    );
  },
  async onState({ inputRef, status, progress, error }) {
    if (status === 'done') return;
    await Calibration.update({ status, progress, error }, { where: { id: Number(inputRef) } });
  },
  describeError(err) {
    const mapped = engineToApi(err, []);
    if (mapped instanceof ApiError) return mapped.message;
    console.error('[steerwise] calibration failed', err);
    return 'The calibration failed on the server; the detail has been logged.';
  },
});
