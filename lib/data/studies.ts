import 'server-only';
import { Study, User } from '@/models';
import { ApiError } from '../http';
import { assertPermission, type Caller } from '../auth';
import { recordAudit } from './record-audit';
import { getDb } from '../db';
import { cancelJob, enqueueJob, latestJob, registerJobKind, stopRecordJob, waitForJob } from '../jobs';
import { runCompute } from '../jobs/pool';
import {
  StudyBudgetError,
  StudyInputError,
  validateStudySpec,
  type StudyResult,
  type StudySpec,
} from '../studies/monte-carlo';
import type { StudyRequest } from '../validations/study';
import { findTeamArrayRevision } from './datasets';
import { SOFTWARE_VERSION } from '../version';

/**
 * Studies: stored, queued Monte Carlo runs of lib/studies/monte-carlo.ts.
 * Creating or deleting one needs `studies.run` (engineers, admins); reading needs
 * `arrays.read` (every role). Everything is scoped by the caller's team.
 */
export interface StudyInputs {
  request: StudyRequest;
  spec: StudySpec;
  array: {
    elements: number;
    spacingWavelengths: number;
    arrayId?: number;
    arrayRevisionId?: number;
    revision?: number;
    name?: string;
  };
}

export interface StudyDto {
  id: number;
  name: string;
  status: Study['status'];
  progress: number;
  error: string | null;
  inputs: StudyInputs;
  result: StudyResult | null;
  softwareVersion: string;
  arrayRevisionId: number | null;
  createdAt: string;
  updatedAt: string;
  createdBy: { id: number; name: string } | null;
}

export type StudyListItem = Omit<StudyDto, 'inputs' | 'result'> & {
  variable: StudySpec['sweep']['variable'];
  values: number[];
  methods: StudySpec['methods'];
  trials: number;
  arrayLabel: string;
};

export const STUDY_JOB = 'study';

function toDto(study: Study, creator: User | null): StudyDto {
  return {
    id: study.id,
    name: study.name,
    status: study.status,
    progress: study.progress,
    error: study.error ?? null,
    inputs: study.inputs as unknown as StudyInputs,
    result: (study.result ?? null) as unknown as StudyResult | null,
    softwareVersion: study.softwareVersion,
    arrayRevisionId: (study.arrayRevisionId as number | null) ?? null,
    createdAt: study.createdAt.toISOString(),
    updatedAt: study.updatedAt.toISOString(),
    createdBy: creator ? { id: creator.id, name: creator.name } : null,
  };
}

/** Turns the pure module's refusals into 422 bodies naming the field. */
export function studyErrorToApi(err: unknown): unknown {
  if (err instanceof StudyInputError) {
    const field =
      err.field === 'elements' || err.field === 'spacingWavelengths'
        ? `array.${err.field}`
        : ['bearingsDeg', 'powersDb', 'correlation'].includes(err.field)
          ? `sources.${err.field}`
          : err.field;
    return new ApiError('validation_failed', `${field}: ${err.message}`, { fields: { [field]: [err.message] } });
  }
  if (err instanceof StudyBudgetError)
    return new ApiError('validation_failed', err.message, { fields: { trials: [err.message] } });
  return err;
}

/** The pure-module spec of a validated request and its resolved array. */
export function specOf(input: StudyRequest, array: { elements: number; spacingWavelengths: number }): StudySpec {
  return {
    elements: array.elements,
    spacingWavelengths: array.spacingWavelengths,
    bearingsDeg: input.sources.bearingsDeg,
    powersDb: input.sources.powersDb,
    ...(input.sources.correlation !== undefined ? { correlation: input.sources.correlation } : {}),
    snapshots: input.snapshots,
    sweep: input.sweep,
    methods: input.methods,
    trials: input.trials,
    seed: input.seed,
    ...(input.forwardBackward !== undefined ? { forwardBackward: input.forwardBackward } : {}),
    ...(input.smoothing !== undefined ? { smoothing: input.smoothing } : {}),
  };
}

/**
 * Validates (422 naming the field, or the budget refusal with how to shrink
 * the study), stores the study as queued and puts it on the job queue.
 * Returns the stored study at once, and the job's promise for callers that wait (the seed).
 */
export async function createStudy({
  caller,
  input,
}: {
  caller: Caller;
  input: StudyRequest;
}): Promise<{ study: StudyDto; done: Promise<void> }> {
  assertPermission(caller, 'studies.run');
  const db = await getDb();
  let array: StudyInputs['array'];
  if (input.arrayId !== undefined) {
    const found = await findTeamArrayRevision({ caller, arrayId: input.arrayId });
    const states = (found.revision.config as { elementStates?: { enabled?: boolean }[] }).elementStates;
    const disabled = Array.isArray(states) ? states.flatMap((s, i) => (s && s.enabled === false ? [i + 1] : [])) : [];
    if (disabled.length) {
      throw new ApiError(
        'validation_failed',
        `Array "${found.array.name}" (revision ${found.revision.revision}) has disabled element(s) ${disabled.join(', ')}; studies simulate a full uniform line. Enable them or give array {elements, spacingWavelengths}.`,
        {
          fields: { arrayId: [`elements ${disabled.join(', ')} are disabled`] },
        },
      );
    }
    array = {
      elements: found.revision.elements,
      spacingWavelengths: found.revision.spacingWavelengths,
      arrayId: found.array.id,
      arrayRevisionId: found.revision.id,
      revision: found.revision.revision,
      name: found.array.name,
    };
  } else {
    array = { elements: input.array!.elements, spacingWavelengths: input.array!.spacingWavelengths };
  }
  const spec = specOf(input, array);
  try {
    validateStudySpec(spec);
  } catch (err) {
    throw studyErrorToApi(err);
  }
  const inputs: StudyInputs = { request: input, spec, array };
  const { study, job } = await db.transaction(async (transaction) => {
    const created = await Study.create(
      {
        teamId: caller.teamId,
        name: input.name,
        status: 'queued',
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
        action: 'study.started',
        target: input.name,
        detail: { id: created.id },
      },
      transaction,
    );
    const queued = await enqueueJob({
      kind: STUDY_JOB,
      inputRef: String(created.id),
      teamId: caller.teamId,
      ownerId: caller.id,
      transaction,
    });
    return { study: created, job: queued };
  });
  const done = waitForJob(job.id).then(() => undefined);
  return { study: await getStudy({ caller, id: study.id }), done };
}

/**
 * The study job kind: the study row is its input. The Monte Carlo runs in a
 * worker thread; a cancel (Stop, or DELETE) aborts the task, which stops that
 * thread. The same spec and seed give the same result, so a re-queued job
 * stores the same answer.
 */
registerJobKind<StudyResult | null>({
  kind: STUDY_JOB,
  maxAttempts: 2,
  async run({ job, signal, setProgress }) {
    const study = await Study.findByPk(Number(job.inputRef));
    if (!study) return null;
    const { spec } = study.inputs as unknown as StudyInputs;
    return runCompute('study', spec, { signal, onProgress: setProgress });
  },
  async store({ job, value, transaction }) {
    if (!value) return;
    await Study.update(
      { result: value as unknown as Record<string, unknown>, error: null },
      { where: { id: Number(job.inputRef) }, transaction },
    );
  },
  async onState({ inputRef, status, progress, error }) {
    await Study.update({ status, progress, error }, { where: { id: Number(inputRef) } });
  },
  describeError(err) {
    const mapped = studyErrorToApi(err);
    if (mapped instanceof ApiError) return mapped.message;
    console.error('[steerwise] study failed', err);
    return 'The study failed on the server; the detail has been logged.';
  },
});

async function findStudy(caller: Caller, id: number): Promise<Study> {
  await getDb();
  const study = await Study.findOne({ where: { id, teamId: caller.teamId } });
  if (!study) throw new ApiError('not_found', `No study with id ${id} in your team.`);
  return study;
}

export async function getStudy({ caller, id }: { caller: Caller; id: number }): Promise<StudyDto> {
  assertPermission(caller, 'arrays.read');
  const study = await findStudy(caller, id);
  const creator = study.createdById ? await User.findByPk(study.createdById as number) : null;
  return toDto(study, creator);
}

export async function listStudies({
  caller,
  limit = 100,
}: {
  caller: Caller;
  limit?: number;
}): Promise<StudyListItem[]> {
  assertPermission(caller, 'arrays.read');
  await getDb();
  const studies = await Study.findAll({
    where: { teamId: caller.teamId },
    attributes: { exclude: ['result'] },
    include: [{ model: User, as: 'createdBy', attributes: ['id', 'name'] }],
    order: [
      ['createdAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit,
  });
  return studies.map((s) => {
    const inputs = s.inputs as unknown as StudyInputs;
    const creator = (s as unknown as { createdBy?: User | null }).createdBy ?? null;
    return {
      id: s.id,
      name: s.name,
      status: s.status,
      progress: s.progress,
      error: s.error ?? null,
      softwareVersion: s.softwareVersion,
      arrayRevisionId: (s.arrayRevisionId as number | null) ?? null,
      createdAt: s.createdAt.toISOString(),
      updatedAt: s.updatedAt.toISOString(),
      createdBy: creator ? { id: creator.id, name: creator.name } : null,
      variable: inputs.spec.sweep.variable,
      values: inputs.spec.sweep.values,
      methods: inputs.spec.methods,
      trials: inputs.spec.trials,
      arrayLabel: inputs.array.name
        ? `${inputs.array.name} r${inputs.array.revision}`
        : `${inputs.array.elements} × ${inputs.array.spacingWavelengths} λ`,
    };
  });
}

/** Deletes a study (engineers, admins); a running one is stopped first. */
export async function deleteStudy({ caller, id }: { caller: Caller; id: number }): Promise<void> {
  assertPermission(caller, 'studies.run');
  const study = await findStudy(caller, id);
  const job = await latestJob(STUDY_JOB, String(id));
  if (job) await cancelJob(job.id, 'The study was deleted while it ran.');
  const db = await getDb();
  await db.transaction(async (transaction) => {
    await study.destroy({ transaction });
    await recordAudit(
      { teamId: caller.teamId, userId: caller.id, action: 'study.deleted', target: study.name, detail: { id } },
      transaction,
    );
  });
}

/** Stops a queued or running study (engineers, admins); 409 when it has already ended. */
export async function cancelStudy({ caller, id }: { caller: Caller; id: number }): Promise<StudyDto> {
  assertPermission(caller, 'studies.run');
  const study = await findStudy(caller, id);
  const stopped = await stopRecordJob(STUDY_JOB, id, caller.name);
  if (!stopped) {
    const now = await Study.findByPk(id);
    throw new ApiError(
      'conflict',
      `Study ${id} is ${now?.status ?? study.status}; only a queued or running study can be stopped.`,
    );
  }
  await recordAudit({
    teamId: caller.teamId,
    userId: caller.id,
    action: 'study.cancelled',
    target: study.name,
    detail: { id },
  });
  return getStudy({ caller, id });
}
