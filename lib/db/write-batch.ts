import 'server-only';
import { Transaction } from 'sequelize';
import { getDb } from './index';
import { dbTarget } from '../env';

/**
 * Group commit of short write transactions on SQLite (the inline estimate path).
 *
 * SQLite has one writer at a time, and Sequelize opens a new sqlite3 connection for
 * every transaction. Many concurrent request transactions then wait for the write
 * lock inside SQLite's busy handler, each one holding a thread of libuv's pool (4 by
 * default) while it sleeps; the transaction that holds the lock needs one of those
 * threads for its next statement, so under load everything stalls until busy
 * timeouts fire (measured: 16 clients, SQLITE_BUSY errors and 10 s latencies).
 *
 * Here the process keeps at most one such transaction open: work items queue up, and
 * each flush runs every queued item, in order, inside one immediate transaction (one
 * connection, one BEGIN, one COMMIT for the lot). If the batch fails, each of its items
 * is retried alone in its own transaction, so one bad item does not fail the others.
 * On Postgres (row locks, a connection pool) every item simply gets its own transaction.
 *
 * A work item must only write through the transaction it is given (it may run twice:
 * once in a batch that rolled back, then alone).
 */
export type WriteWork<T> = (transaction: Transaction) => Promise<T>;

interface Item {
  work: WriteWork<unknown>;
  resolve(v: unknown): void;
  reject(e: unknown): void;
}

interface Batcher {
  queue: Item[];
  flushing: boolean;
}

const MAX_BATCH = 64;
const batchers = ((globalThis as Record<string, unknown>).__steerwiseWriteBatch ??= new Map<string, Batcher>()) as Map<
  string,
  Batcher
>;

export async function inWriteBatch<T>(work: WriteWork<T>): Promise<T> {
  const db = await getDb();
  if (db.getDialect() !== 'sqlite') return db.transaction((t) => work(t));
  const key = dbTarget();
  let b = batchers.get(key);
  if (!b) batchers.set(key, (b = { queue: [], flushing: false }));
  const batcher = b;
  return new Promise<T>((resolve, reject) => {
    batcher.queue.push({ work: work as WriteWork<unknown>, resolve: resolve as (v: unknown) => void, reject });
    if (!batcher.flushing) void flush(batcher);
  });
}

async function flush(b: Batcher): Promise<void> {
  b.flushing = true;
  try {
    const db = await getDb();
    while (b.queue.length) {
      const items = b.queue.splice(0, MAX_BATCH);
      let values: unknown[] | null = null;
      try {
        values = await db.transaction({ type: Transaction.TYPES.IMMEDIATE }, async (transaction) => {
          const out: unknown[] = [];
          for (const item of items) out.push(await item.work(transaction));
          return out;
        });
      } catch {
        values = null;
      }
      if (values) {
        items.forEach((item, i) => item.resolve(values![i]));
        continue;
      }
      for (const item of items) {
        try {
          item.resolve(await db.transaction({ type: Transaction.TYPES.IMMEDIATE }, (t) => item.work(t)));
        } catch (err) {
          item.reject(err);
        }
      }
    }
  } catch (err) {
    for (const item of b.queue.splice(0)) item.reject(err);
  } finally {
    b.flushing = false;
  }
}
