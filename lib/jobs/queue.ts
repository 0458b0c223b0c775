import 'server-only';
import type { Transaction } from 'sequelize';
import { databaseUrl } from '../env';

/**
 * The job queue, one interface with two backends (see DEVELOPERS.md, "Jobs" and "Postgres"):
 *
 * - embedded (SQLite, the default): the `jobs` table is the queue; every process's
 *   runner claims queued rows itself (lib/jobs/index.ts, claimJob) and wakes
 *   after a commit or once a second;
 * - pg-boss (DATABASE_URL=postgres://…): enqueueing also sends `{ jobId }` to the
 *   pg-boss queue `steerwise-jobs` in the same transaction, and consumers
 *   (`npm run worker` processes, and web processes unless STEERWISE_RUN_JOBS=0)
 *   fetch from it with SKIP LOCKED. The `jobs` row stays the record of status,
 *   lease and attempts: a message only says "look at job N"; the conditional
 *   claim on the row decides who runs it, so a duplicate message or a retry of
 *   a message whose worker died never runs a job twice at the same time.
 *
 * STEERWISE_QUEUE=embedded keeps the embedded queue on Postgres (one process only).
 */
export type QueueBackend = 'embedded' | 'pg-boss';

export const QUEUE_NAME = 'steerwise-jobs';

export function queueBackend(): QueueBackend {
  if (!databaseUrl()) return 'embedded';
  return process.env.STEERWISE_QUEUE === 'embedded' ? 'embedded' : 'pg-boss';
}

/** Whether this process runs queued jobs (STEERWISE_RUN_JOBS=0: it only enqueues; request-bound jobs still run here). */
export function runsQueuedJobs(): boolean {
  return process.env.STEERWISE_RUN_JOBS !== '0';
}

// pg-boss's own types are loaded lazily: the SQLite default never imports it.
type Boss = import('pg-boss');
type Holder = { boss?: Promise<Boss>; consumers: { stop: boolean }[] };
const holders = ((globalThis as Record<string, unknown>).__steerwiseBoss ??= new Map<string, Holder>()) as Map<
  string,
  Holder
>;

function holder(): Holder {
  const url = databaseUrl()!;
  let h = holders.get(url);
  if (!h) holders.set(url, (h = { consumers: [] }));
  return h;
}

/** How long a fetched message may stay active before pg-boss retries it (the jobs row's lease recovers sooner). */
function expireSeconds(): number {
  const v = Number(process.env.STEERWISE_QUEUE_EXPIRE_SECONDS);
  return Number.isFinite(v) && v >= 1 ? Math.floor(v) : 3600;
}

async function boss(): Promise<Boss> {
  const h = holder();
  if (!h.boss) {
    const made = (async () => {
      const PgBoss = ((await import('pg-boss')) as unknown as { default: new (o: object) => Boss }).default;
      const b = new PgBoss({
        connectionString: databaseUrl()!,
        schema: 'pgboss',
        max: Number(process.env.STEERWISE_QUEUE_POOL_MAX || 4),
        application_name: 'steerwise-queue',
      });
      b.on('error', (err) => console.error('[steerwise] queue', err));
      await b.start();
      if (!(await b.getQueue(QUEUE_NAME))) {
        // Two processes starting together may both try; the loser's error is harmless.
        await b
          .createQueue(QUEUE_NAME, { name: QUEUE_NAME, retryLimit: 5, retryDelay: 1, expireInSeconds: expireSeconds() })
          .catch(async (err) => {
            if (!(await b.getQueue(QUEUE_NAME))) throw err;
          });
      }
      return b;
    })();
    made.catch(() => {
      if (h.boss === made) h.boss = undefined;
    });
    h.boss = made;
  }
  return h.boss;
}

/**
 * Sends "run job N" to the pg-boss queue; inside `transaction` (the one that
 * inserted or re-queued the row) when given, so the message exists exactly
 * when the row does.
 */
export async function sendJobMessage(jobId: number, transaction?: Transaction): Promise<void> {
  const b = await boss();
  const connection = (transaction as unknown as { connection?: { query(text: string, values: unknown[]): unknown } })
    ?.connection;
  await b.send(QUEUE_NAME, { jobId }, {
    retryLimit: 5,
    retryDelay: 1,
    expireInSeconds: expireSeconds(),
    ...(connection
      ? {
          db: {
            executeSql: (text: string, values: unknown[]) =>
              connection.query(text, values) as Promise<{ rows: unknown[] }>,
          },
        }
      : {}),
  } as Parameters<Boss['send']>[2]);
}

/**
 * Starts `loops` consumers of the pg-boss queue in this process: each fetches
 * one message, awaits `handle(jobId)` and completes it (or fails it, so
 * pg-boss retries it). A message whose process dies stays active until it
 * expires and is then retried by pg-boss; the jobs row's lease sweep
 * (recoverStaleJobs) re-queues and re-sends it sooner.
 */
export async function startQueueConsumers(loops: number, handle: (jobId: number) => Promise<void>): Promise<void> {
  const b = await boss();
  const h = holder();
  for (let i = 0; i < loops; i++) {
    const consumer = { stop: false };
    h.consumers.push(consumer);
    void (async () => {
      while (!consumer.stop) {
        let fetched: { id: string; data: { jobId: number } }[] | null = null;
        try {
          fetched = await b.fetch<{ jobId: number }>(QUEUE_NAME, { batchSize: 1 });
        } catch (err) {
          console.error('[steerwise] queue fetch', err);
        }
        const message = fetched?.[0];
        if (!message) {
          await new Promise((r) => setTimeout(r, 200));
          continue;
        }
        try {
          await handle(Number(message.data.jobId));
          await b.complete(QUEUE_NAME, message.id);
        } catch (err) {
          console.error('[steerwise] queued job', message.data.jobId, err);
          await b.fail(QUEUE_NAME, message.id, { message: String(err) }).catch(() => undefined);
        }
      }
    })();
  }
}

/** Consumers fetch no further message (the job each one is running goes on). */
export function pauseQueueConsumers(): void {
  if (!databaseUrl()) return;
  for (const c of holder().consumers) c.stop = true;
}

/** Stops this process's consumers and pg-boss (tests, shutdown). */
export async function stopQueue(): Promise<void> {
  if (!databaseUrl()) return;
  const h = holder();
  for (const c of h.consumers) c.stop = true;
  h.consumers = [];
  const made = h.boss;
  h.boss = undefined;
  if (made) await (await made.catch(() => null))?.stop({ graceful: false, wait: true, close: true });
}
