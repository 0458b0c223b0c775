import 'server-only';
import os from 'node:os';
import { randomBytes } from 'node:crypto';
import { Op, Transaction, literal } from 'sequelize';
import { Job, type JobStatus } from '@/models';
import { getDb } from '../db';
import { dbTarget } from '../env';
import { poolSize } from './pool';
import {
  pauseQueueConsumers,
  queueBackend,
  runsQueuedJobs,
  sendJobMessage,
  startQueueConsumers,
  stopQueue,
} from './queue';

/**
 * Durable jobs: one module, one table (`jobs`, migration 0004), every kind.
 *
 * A kind registers itself once with `registerJobKind` (see DEVELOPERS.md,
 * "Jobs"); from then on this module owns the lifecycle of its jobs:
 *
 *   enqueueJob ──▶ queued ──claim──▶ running ──▶ done | failed | cancelled
 *                    ▲                  │
 *                    └── lease expired ─┘ (re-queued, or failed after maxAttempts)
 *
 * - claim: a conditional UPDATE … WHERE status = 'queued' inside an immediate
 *   transaction, so two processes (or, later, two Postgres clients) never run
 *   the same job;
 * - lease: the claiming process owns the job until `leaseExpiresAt` and renews
 *   it with a heartbeat (which also writes the progress); a job whose lease ran
 *   out, or whose owner process on this host is gone, is recovered at start
 *   and on every sweep;
 * - cancel: the row becomes `cancelled` at once; the running process aborts
 *   the job's signal (its own, or at the next heartbeat when another process
 *   runs it), which stops the compute thread;
 * - the kind's own row (an estimate run, a study) mirrors status, progress and
 *   error through the kind's `onState`.
 *
 * The compute itself runs in worker threads (lib/jobs/pool.ts); a kind's
 * `run` only loads its input, calls `runCompute` and returns the result, and
 * its `store` writes that result in the same transaction that marks the job
 * done, only if this process still holds the job: a result is written exactly
 * once even when a job whose worker was thought dead runs twice.
 *
 * Where queued jobs come from (lib/jobs/queue.ts): on SQLite every runner
 * claims rows of the jobs table; on Postgres the pg-boss queue hands job ids
 * to consumers (`npm run worker`, web processes unless STEERWISE_RUN_JOBS=0),
 * which claim the row by id with the same conditional update.
 */

export interface JobContext {
  job: Job;
  /** Aborted when the job is cancelled (here or by another process). */
  signal: AbortSignal;
  /** Records the finished share (0 … 1); written with the next heartbeat. */
  setProgress(fraction: number): void;
  /** A transient job's input as handed to enqueueJob (held in this process only). */
  localInput?: unknown;
}

export interface JobState {
  id: number;
  kind: string;
  inputRef: string;
  status: JobStatus;
  progress: number;
  error: string | null;
}

export interface JobKind<T = unknown> {
  kind: string;
  /** Runs counted before a job whose process died is failed instead of re-queued. Default 3. */
  maxAttempts?: number;
  /**
   * A job that belongs to one request (parsing an upload the request waits
   * for): its row is deleted when it ends, and a stale one is deleted rather
   * than re-run, since the request that would take the answer is gone.
   */
  transient?: boolean;
  /** The work, on the web thread: load the input, call runCompute, return the result. Its value goes to in-process waiters. */
  run(ctx: JobContext): Promise<T>;
  /**
   * Writes the result of a successful `run` onto the kind's rows, inside the
   * transaction that moves the job to done; called only when this process
   * still owns the running job, so a result is stored exactly once.
   */
  store?(ctx: { job: Job; value: T; transaction: Transaction }): Promise<void>;
  /**
   * Called when `run` returned a value that was not stored: the job was cancelled (or its
   * record deleted) while `run` finished, or this process lost the job to a lease sweep. For a
   * kind whose `run` leaves something outside the database (files), to remove it when nothing
   * else will use it. Errors are logged, never thrown.
   */
  discard?(ctx: { job: Job; value: T }): Promise<void>;
  /** Mirrors a state change onto the kind's own row. */
  onState?(state: JobState): Promise<void>;
  /** The message stored and shown to the job's owner when `run` throws. */
  describeError?(err: unknown): string;
}

export class JobCancelledError extends Error {
  constructor(message = 'The job was stopped.') {
    super(message);
    this.name = 'JobCancelledError';
  }
}

export interface JobOutcome<T = unknown> {
  status: 'done' | 'failed' | 'cancelled';
  error: string | null;
  /** In-process only: the value `run` returned, or the error it threw. */
  value?: T;
  cause?: unknown;
}

const TERMINAL: JobStatus[] = ['done', 'failed', 'cancelled'];

export function leaseMs(): number {
  const v = Number(process.env.STEERWISE_JOB_LEASE_MS);
  return Number.isFinite(v) && v >= 1000 ? v : 15_000;
}

function heartbeatMs(): number {
  return Math.max(250, Math.min(1000, Math.floor(leaseMs() / 3)));
}

interface Running {
  controller: AbortController;
  progress: number;
  written: number;
}

interface RunnerState {
  owner: string;
  started: boolean;
  pumping: boolean;
  again: boolean;
  running: Map<number, Running>;
  waiters: Map<number, ((o: JobOutcome) => void)[]>;
  localInputs: Map<number, unknown>;
  timer?: NodeJS.Timeout;
  lastSweep: number;
  stopped?: boolean;
}

// On globalThis: Next's instrumentation bundle and the route bundles each hold a copy of this module.
const g = globalThis as Record<string, unknown>;
const kinds = (g.__steerwiseJobKinds ??= new Map<string, JobKind>()) as Map<string, JobKind>;
const runners = (g.__steerwiseJobRunners ??= new Map<string, RunnerState>()) as Map<string, RunnerState>;

function state(): RunnerState {
  const key = dbTarget();
  let s = runners.get(key);
  if (!s) {
    s = {
      owner: `${os.hostname()}/${process.pid}/${randomBytes(4).toString('hex')}`,
      started: false,
      pumping: false,
      again: false,
      running: new Map(),
      waiters: new Map(),
      localInputs: new Map(),
      lastSweep: 0,
    };
    runners.set(key, s);
  }
  return s;
}

/** Registers (or replaces) a kind. Call at module load of the kind's data module. */
export function registerJobKind<T>(kind: JobKind<T>): void {
  kinds.set(kind.kind, kind as JobKind);
}

function toState(job: Job): JobState {
  return {
    id: job.id,
    kind: job.kind,
    inputRef: job.inputRef,
    status: job.status,
    progress: job.progress,
    error: job.error ?? null,
  };
}

async function mirror(kindName: string, s: JobState): Promise<void> {
  const kind = kinds.get(kindName);
  if (!kind?.onState) return;
  try {
    await kind.onState(s);
  } catch (err) {
    console.error('[steerwise] job state mirror failed', s.kind, s.id, err);
  }
}

/** Adds a queued job (inside the caller's transaction when given) and wakes the runner after the commit. */
export async function enqueueJob({
  kind,
  inputRef,
  teamId = null,
  ownerId = null,
  transaction,
  localInput,
}: {
  kind: string;
  inputRef: string;
  teamId?: number | null;
  ownerId?: number | null;
  transaction?: Transaction;
  /** Transient kinds only: an in-memory input handed to `run` as ctx.localInput. */
  localInput?: unknown;
}): Promise<Job> {
  const k = kinds.get(kind);
  if (!k) throw new Error(`job kind "${kind}" is not registered`);
  await getDb();
  // A transient job is reserved for this process (its input lives with the waiting request).
  const job = await Job.create(
    {
      kind,
      inputRef,
      teamId,
      ownerId,
      status: 'queued',
      maxAttempts: k.maxAttempts ?? 3,
      leaseOwner: k.transient ? state().owner : null,
    },
    transaction ? { transaction } : {},
  );
  if (localInput !== undefined) state().localInputs.set(job.id, localInput);
  // On pg-boss the message is sent in the same transaction as the row (or right after it, without one).
  if (!k.transient && queueBackend() === 'pg-boss') await sendJobMessage(job.id, transaction);
  if (transaction) transaction.afterCommit(() => kick());
  else kick();
  return job;
}

/**
 * Records a job that already ran inside its request (the compute ran on the pool before anything
 * was stored): the row is inserted in its final state, inside the caller's transaction with the
 * kind's own rows, so the job's record, its result and its audit event commit together. No runner,
 * queue message, lease or state mirror is involved; the row keeps every kind in the jobs table.
 */
export async function recordFinishedJob({
  kind,
  inputRef,
  teamId = null,
  ownerId = null,
  status,
  error = null,
  startedAt,
  transaction,
}: {
  kind: string;
  inputRef: string;
  teamId?: number | null;
  ownerId?: number | null;
  status: 'done' | 'failed';
  error?: string | null;
  startedAt: Date;
  transaction: Transaction;
}): Promise<Job> {
  const k = kinds.get(kind);
  if (!k) throw new Error(`job kind "${kind}" is not registered`);
  return Job.create(
    {
      kind,
      inputRef,
      teamId,
      ownerId,
      status,
      progress: status === 'done' ? 1 : 0,
      attempts: 1,
      maxAttempts: k.maxAttempts ?? 3,
      error,
      startedAt,
      finishedAt: new Date(),
    },
    { transaction },
  );
}

/** The newest job of a kind for an input (the run or study page's Stop button finds its job by this). */
export async function latestJob(kind: string, inputRef: string): Promise<Job | null> {
  await getDb();
  return Job.findOne({ where: { kind, inputRef }, order: [['id', 'DESC']] });
}

/**
 * Claims the oldest queued job of a registered kind: the row moves to
 * running with this process as lease owner only if it is still queued.
 */
export async function claimJob(): Promise<Job | null> {
  const s = state();
  const names = [...kinds.keys()];
  if (!names.length) return null;
  const db = await getDb();
  // On pg-boss the queue hands out shared jobs (runQueuedJob); the table loop here takes only this process's own transient ones.
  const owners =
    queueBackend() === 'pg-boss' || !runsQueuedJobs()
      ? [{ leaseOwner: s.owner }]
      : [{ leaseOwner: null }, { leaseOwner: s.owner }];
  return db.transaction({ type: Transaction.TYPES.IMMEDIATE }, async (transaction) => {
    const candidate = await Job.findOne({
      where: { status: 'queued', kind: names, [Op.or]: owners },
      order: [['id', 'ASC']],
      transaction,
      // Postgres: concurrent claimers skip a row another transaction holds instead of queueing behind it (ignored on SQLite).
      lock: true,
      skipLocked: true,
    });
    if (!candidate) return null;
    const now = new Date();
    const [n] = await Job.update(
      {
        status: 'running',
        leaseOwner: s.owner,
        leaseExpiresAt: new Date(now.getTime() + leaseMs()),
        heartbeatAt: now,
        startedAt: now,
        attempts: candidate.attempts + 1,
        progress: 0,
        error: null,
      },
      { where: { id: candidate.id, status: 'queued' }, transaction },
    );
    if (n !== 1) return null;
    await candidate.reload({ transaction });
    return candidate;
  });
}

function settleWaiters(id: number, outcome: JobOutcome): void {
  const s = state();
  const list = s.waiters.get(id);
  s.waiters.delete(id);
  for (const resolve of list ?? []) resolve(outcome);
}

function messageOf(kind: JobKind | undefined, err: unknown): string {
  if (kind?.describeError) return kind.describeError(err);
  return 'The job failed on the server; the detail has been logged.';
}

async function execute(job: Job): Promise<void> {
  const s = state();
  const kind = kinds.get(job.kind)!;
  const entry: Running = { controller: new AbortController(), progress: 0, written: 0 };
  s.running.set(job.id, entry);
  const beat = setInterval(() => void heartbeat(job, entry), heartbeatMs());
  beat.unref();
  let outcome: JobOutcome;
  let produced: { value: unknown } | null = null;
  await mirror(job.kind, { ...toState(job), status: 'running' });
  try {
    const value = await kind.run({
      job,
      localInput: s.localInputs.get(job.id),
      signal: entry.controller.signal,
      setProgress: (f) => {
        entry.progress = Math.min(1, Math.max(0, f));
      },
    });
    produced = { value };
    outcome = entry.controller.signal.aborted
      ? { status: 'cancelled', error: cancelReason(entry) }
      : { status: 'done', error: null, value };
  } catch (err) {
    if (entry.controller.signal.aborted) outcome = { status: 'cancelled', error: cancelReason(entry), cause: err };
    else {
      const message = messageOf(kind, err);
      if (!kind.describeError) console.error('[steerwise] job failed', job.kind, job.id, err);
      outcome = { status: 'failed', error: message, cause: err };
    }
  } finally {
    clearInterval(beat);
    s.running.delete(job.id);
    s.localInputs.delete(job.id);
  }
  let stored = false;
  try {
    const n = await finishJob(job, kind, outcome, entry.progress);
    stored = n === 1 && outcome.status === 'done';
    // n = 0: cancelled meanwhile (the row already says so) or the lease was lost to a sweep.
    if (n === 1)
      await mirror(job.kind, {
        ...toState(job),
        status: outcome.status,
        progress: outcome.status === 'done' ? 1 : entry.progress,
        error: outcome.error,
      });
    if (kind.transient) await Job.destroy({ where: { id: job.id } });
  } catch (err) {
    console.error('[steerwise] job state could not be stored', job.kind, job.id, err);
  }
  if (produced && !stored && kind.discard) {
    await kind.discard({ job, value: produced.value }).catch((err: unknown) => {
      console.error('[steerwise] job value could not be discarded', job.kind, job.id, err);
    });
  }
  settleWaiters(job.id, outcome);
  kick();
}

/**
 * Moves the job from running (held by this process) to its outcome and, for
 * a done job of a kind with `store`, writes the result in the same
 * transaction; 0 when the job was no longer this process's (cancelled, or its
 * lease was recovered after this process was thought dead): nothing is stored.
 */
async function finishJob(job: Job, kind: JobKind, outcome: JobOutcome, progress: number): Promise<number> {
  const s = state();
  const db = await getDb();
  return db.transaction({ type: Transaction.TYPES.IMMEDIATE }, async (transaction) => {
    const [n] = await Job.update(
      {
        status: outcome.status,
        progress: outcome.status === 'done' ? 1 : progress,
        error: outcome.error,
        finishedAt: new Date(),
        leaseOwner: null,
        leaseExpiresAt: null,
      },
      { where: { id: job.id, status: 'running', leaseOwner: s.owner }, transaction },
    );
    if (n === 1 && outcome.status === 'done' && kind.store) {
      await kind.store({ job, value: outcome.value, transaction });
      if (process.env.STEERWISE_JOB_LOG === '1')
        console.log(`[steerwise] job-stored ${JSON.stringify({ jobId: job.id, kind: job.kind, owner: s.owner })}`);
    }
    return n;
  });
}

/**
 * Runs one job named by a queue message (pg-boss backend): claims the row if
 * it is still queued and runs it to the end here; returns at once when the
 * job already ended, is cancelled, or another process holds it.
 */
export async function runQueuedJob(jobId: number): Promise<void> {
  const s = state();
  const db = await getDb();
  if (db.getDialect() === 'postgres') {
    // One statement instead of read, update, re-read: the same conditions, the row back through RETURNING.
    const now = new Date();
    const [, claimed] = await Job.update(
      {
        status: 'running',
        leaseOwner: s.owner,
        leaseExpiresAt: new Date(now.getTime() + leaseMs()),
        heartbeatAt: now,
        startedAt: now,
        attempts: literal('"attempts" + 1') as unknown as number,
        progress: 0,
        error: null,
      },
      {
        where: {
          id: jobId,
          status: 'queued',
          kind: [...kinds.keys()],
          // A transient job reserved by its web process stays with it.
          [Op.or]: [{ leaseOwner: null }, { leaseOwner: s.owner }],
        },
        returning: true,
      },
    );
    if (claimed.length === 1) await execute(claimed[0]);
    return;
  }
  const job = await Job.findByPk(jobId);
  if (!job || job.status !== 'queued' || !kinds.has(job.kind)) return;
  if (job.leaseOwner && job.leaseOwner !== s.owner) return; // a transient job reserved by its web process
  const now = new Date();
  const [n] = await Job.update(
    {
      status: 'running',
      leaseOwner: s.owner,
      leaseExpiresAt: new Date(now.getTime() + leaseMs()),
      heartbeatAt: now,
      startedAt: now,
      attempts: job.attempts + 1,
      progress: 0,
      error: null,
    },
    { where: { id: job.id, status: 'queued', attempts: job.attempts } },
  );
  if (n !== 1) return;
  await job.reload();
  await execute(job);
}

function cancelReason(entry: Running): string {
  const r = entry.controller.signal.reason;
  return r instanceof Error && r.name === 'JobCancelledError' ? r.message : 'Stopped by a user before it finished.';
}

async function heartbeat(job: Job, entry: Running): Promise<void> {
  const s = state();
  const now = new Date();
  try {
    const [n] = await Job.update(
      { leaseExpiresAt: new Date(now.getTime() + leaseMs()), heartbeatAt: now, progress: entry.progress },
      { where: { id: job.id, status: 'running', leaseOwner: s.owner } },
    );
    if (n === 0 && !entry.controller.signal.aborted) {
      // Cancelled elsewhere (or the lease was taken over): stop the work here.
      const row = await Job.findByPk(job.id);
      entry.controller.abort(new JobCancelledError(row?.error ?? 'Stopped before it finished.'));
      return;
    }
    if (entry.progress !== entry.written) {
      entry.written = entry.progress;
      await mirror(job.kind, { ...toState(job), status: 'running', progress: entry.progress });
    }
  } catch (err) {
    console.error('[steerwise] job heartbeat failed', job.kind, job.id, err);
  }
}

/**
 * Stops the newest job of one record (the Stop button and the cancel routes): true when a queued or
 * running job was stopped, false when the record has none left to stop (it already ended).
 */
export async function stopRecordJob(kind: string, recordId: number, stoppedBy: string): Promise<boolean> {
  const job = await latestJob(kind, String(recordId));
  return job ? cancelJob(job.id, `Stopped by ${stoppedBy} before it finished.`) : false;
}

/**
 * Cancels a queued or running job: the row becomes `cancelled` with the
 * reason, the kind's row mirrors it, and a running job's signal is aborted.
 * Returns false when the job had already ended (nothing to stop).
 */
export async function cancelJob(id: number, reason = 'Stopped by a user before it finished.'): Promise<boolean> {
  await getDb();
  const s = state();
  const job = await Job.findByPk(id);
  if (!job) return false;
  const [n] = await Job.update(
    { status: 'cancelled', error: reason, finishedAt: new Date(), leaseOwner: null, leaseExpiresAt: null },
    { where: { id, status: ['queued', 'running'] } },
  );
  if (n === 0) return false;
  await mirror(job.kind, { ...toState(job), status: 'cancelled', error: reason });
  const local = s.running.get(id);
  if (local) local.controller.abort(new JobCancelledError(reason));
  else {
    s.localInputs.delete(id);
    settleWaiters(id, { status: 'cancelled', error: reason });
    if (kinds.get(job.kind)?.transient) await Job.destroy({ where: { id } });
  }
  return true;
}

/** Resolves when the job ends (in this process or, polled once a second, in another). */
export function waitForJob<T = unknown>(id: number): Promise<JobOutcome<T>> {
  const s = state();
  return new Promise<JobOutcome<T>>((resolve) => {
    let done = false;
    const finish = (o: JobOutcome) => {
      if (done) return;
      done = true;
      clearInterval(poll);
      resolve(o as JobOutcome<T>);
    };
    const list = s.waiters.get(id) ?? [];
    list.push(finish);
    s.waiters.set(id, list);
    const poll = setInterval(async () => {
      if (s.running.has(id)) return;
      const row = await Job.findByPk(id).catch(() => null);
      if (!row) finish({ status: 'failed', error: 'The job no longer exists.' });
      else if (TERMINAL.includes(row.status))
        finish({ status: row.status as JobOutcome['status'], error: row.error ?? null });
    }, 1000);
    poll.unref();
  });
}

function ownerIsGone(owner: string, self: string): boolean {
  if (owner === self) return false;
  const [host, pidText] = owner.split('/');
  if (host !== os.hostname()) return false;
  const pid = Number(pidText);
  if (pid === process.pid) return true; // an earlier runner of this same process (never one that is running now)
  try {
    process.kill(pid, 0);
    return false;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'ESRCH';
  }
}

/**
 * Recovers jobs whose process died: the lease ran out, or the owner process
 * on this host no longer exists. Below the attempt limit the job is queued
 * again (kinds are idempotent: a re-run stores the same answer); at the
 * limit it fails with the reason. Transient jobs are removed.
 */
export async function recoverStaleJobs(): Promise<{ requeued: number; failed: number; removed: number }> {
  await getDb();
  const s = state();
  const now = new Date();
  const rows = await Job.findAll({ where: { status: ['running', 'queued'], leaseOwner: { [Op.ne]: s.owner } } });
  const out = { requeued: 0, failed: 0, removed: 0 };
  for (const job of rows) {
    const gone = ownerIsGone(job.leaseOwner ?? '', s.owner);
    // A queued row with an owner is a transient job reserved by a process; it is stale only when that process is gone.
    if (job.status === 'queued' && !gone) continue;
    const expired = !job.leaseExpiresAt || job.leaseExpiresAt.getTime() < now.getTime();
    if (!expired && !gone) continue;
    const where = { id: job.id, status: job.status, leaseOwner: job.leaseOwner };
    const kind = kinds.get(job.kind);
    if (kind?.transient) {
      out.removed += await Job.destroy({ where });
      continue;
    }
    if (job.attempts >= job.maxAttempts) {
      const error = `Interrupted ${job.attempts} time(s) because the server stopped while it ran; given up after ${job.maxAttempts} attempts. Start it again.`;
      const [n] = await Job.update(
        { status: 'failed', error, finishedAt: now, leaseOwner: null, leaseExpiresAt: null },
        { where },
      );
      if (n) {
        out.failed++;
        await mirror(job.kind, { ...toState(job), status: 'failed', error });
      }
    } else {
      const db = await getDb();
      const n = await db.transaction(async (transaction) => {
        const [changed] = await Job.update(
          { status: 'queued', progress: 0, leaseOwner: null, leaseExpiresAt: null },
          { where, transaction },
        );
        if (changed && queueBackend() === 'pg-boss') await sendJobMessage(job.id, transaction);
        return changed;
      });
      if (n) {
        out.requeued++;
        await mirror(job.kind, { ...toState(job), status: 'queued', progress: 0, error: null });
      }
    }
  }
  return out;
}

/** Claims and starts jobs while compute threads are free. */
async function pump(): Promise<void> {
  const s = state();
  if (s.stopped) return;
  if (s.pumping) {
    s.again = true;
    return;
  }
  s.pumping = true;
  try {
    do {
      s.again = false;
      if (Date.now() - s.lastSweep > leaseMs() / 2) {
        s.lastSweep = Date.now();
        await recoverStaleJobs();
      }
      while (s.running.size < poolSize()) {
        const job = await claimJob();
        if (!job) break;
        void execute(job);
      }
    } while (s.again);
  } catch (err) {
    console.error('[steerwise] job runner', err);
  } finally {
    s.pumping = false;
  }
}

function kick(): void {
  startJobRunner();
  void pump();
}

/**
 * Starts this process's runner once (idempotent): recovers stale jobs, then
 * claims queued ones, and looks again every second for work enqueued by
 * other processes and for expired leases.
 */
export function startJobRunner(): void {
  const s = state();
  if (s.started || s.stopped) return;
  s.started = true;
  s.timer = setInterval(() => void pump(), 1000);
  s.timer.unref();
  void pump();
  if (queueBackend() === 'pg-boss' && runsQueuedJobs()) {
    startQueueConsumers(poolSize(), runQueuedJob).catch((err) =>
      console.error('[steerwise] the job queue did not start', err),
    );
  }
}

/** Stops this process's runner (tests, shutdown): no new claims; resolves when running jobs have ended or after `timeoutMs`. */
export async function stopJobRunner(timeoutMs = 10_000): Promise<void> {
  const s = state();
  if (s.timer) clearInterval(s.timer);
  s.started = false;
  s.stopped = true;
  pauseQueueConsumers();
  const end = Date.now() + timeoutMs;
  while ((s.running.size || s.pumping) && Date.now() < end) await new Promise((r) => setTimeout(r, 50));
  await stopQueue().catch(() => undefined);
}

/** Job ids running in this process (tests, diagnostics). */
export function runningHere(): number[] {
  return [...state().running.keys()];
}
