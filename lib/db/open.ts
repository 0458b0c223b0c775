import fs from 'node:fs';
import { AsyncLocalStorage } from 'node:async_hooks';
import path from 'node:path';
import { Sequelize, Transaction } from 'sequelize';
import sqlite3 from 'sqlite3';
import pg from 'pg';
import { isPostgresTarget } from '../env';

/**
 * Opens a Sequelize instance on a SQLite file, or on Postgres when the target
 * is a postgres:// URL (DATABASE_URL). Shared by the app singleton
 * (lib/db/index.ts) and the operator scripts (migrate, seed, token).
 */
export function createSequelize(target: string): Sequelize {
  if (isPostgresTarget(target)) {
    return new Sequelize(target, {
      dialect: 'postgres',
      dialectModule: pg,
      logging: false,
      pool: { max: Number(process.env.STEERWISE_PG_POOL_MAX || 10), min: 0, idle: 10_000, acquire: 30_000 },
    });
  }
  const file = target;
  fs.mkdirSync(path.dirname(file), { recursive: true });
  const sequelize = new Sequelize({
    dialect: 'sqlite',
    dialectModule: sqlite3,
    storage: file,
    logging: false,
    // Every transaction takes the write lock when it begins. A deferred one that reads first
    // (Sequelize itself reads the table's schema before a DELETE) and writes later fails at once
    // with SQLITE_BUSY if another connection committed in between, and no busy wait or retry can
    // save it. Transactions queue in the process anyway (gateTransactions below), so nothing is lost.
    transactionType: Transaction.TYPES.IMMEDIATE,
  });
  configureEachConnection(sequelize);
  gateTransactions(sequelize);
  return sequelize;
}

/**
 * Sequelize opens one sqlite3 connection per transaction (and one more for everything else),
 * and on SQLite it runs no afterConnect hook: a transaction's connection would have no busy
 * timeout (a lock held elsewhere fails it at once with SQLITE_BUSY) and full syncs. So every
 * connection it hands out gets, once, the busy timeout and the sync level of the main one.
 */
function configureEachConnection(sequelize: Sequelize): void {
  const manager = (sequelize as unknown as { connectionManager: { getConnection(o?: unknown): Promise<unknown> } })
    .connectionManager;
  const get = manager.getConnection.bind(manager);
  const done = new WeakSet<object>();
  manager.getConnection = async (options?: unknown) => {
    const connection = (await get(options)) as sqlite3.Database;
    if (!done.has(connection)) {
      done.add(connection);
      connection.configure('busyTimeout', BUSY_TIMEOUT_MS);
      // With WAL, NORMAL syncs at checkpoints instead of on every commit (a crash of the process
      // loses nothing; a power cut may lose the last commits), as on the main connection.
      await new Promise<void>((resolve, reject) =>
        connection.run('PRAGMA synchronous = NORMAL', (err) => (err ? reject(err) : resolve())),
      );
    }
    return connection;
  };
}

const BUSY_TIMEOUT_MS = 5000;

/** How long a transaction waits for the process's gate before it goes on to SQLite's own busy wait. */
const GATE_WAIT_MS = 10_000;

/**
 * One managed transaction at a time per process on SQLite.
 *
 * Sequelize gives every transaction its own sqlite3 connection, and a connection waiting for
 * SQLite's write lock sleeps inside the busy handler on one of libuv's four pool threads. With
 * a few transactions waiting at once (a DELETE while two jobs finish, say) every pool thread can
 * be asleep while the transaction that holds the lock needs one for its next statement: nothing
 * moves until a busy timeout fires and a request fails with SQLITE_BUSY (measured: four
 * concurrent deletes of running bearing–time records, 500s after 5 s).
 *
 * So transactions queue here, in JavaScript, holding no thread. A transaction opened inside
 * another one's callback (same async context) is not queued, as it would wait for itself; a
 * transaction that has waited GATE_WAIT_MS goes ahead and falls back to the busy handler, so a
 * mistake elsewhere shows as the old SQLITE_BUSY rather than a hang. SQLite allows one writer
 * anyway, so little is lost; Postgres is not gated.
 */
function gateTransactions(sequelize: Sequelize): void {
  const original = sequelize.transaction.bind(sequelize) as (options?: unknown, fn?: unknown) => Promise<unknown>;
  const inside = new AsyncLocalStorage<{ open: boolean }>();
  let tail: Promise<unknown> = Promise.resolve();
  const gated = (a?: unknown, b?: unknown): Promise<unknown> => {
    const [options, fn] = typeof a === 'function' ? [undefined, a] : [a, b];
    // An unmanaged transaction (no callback) or one nested in an open one runs at once.
    if (typeof fn !== 'function' || inside.getStore()?.open) {
      return original(options, fn);
    }
    const turn = tail;
    let release!: () => void;
    tail = new Promise<void>((resolve) => (release = resolve));
    let timer: NodeJS.Timeout | undefined;
    const waited = Promise.race([
      turn,
      new Promise<void>((resolve) => {
        timer = setTimeout(resolve, GATE_WAIT_MS);
        timer.unref?.();
      }),
    ]);
    return waited.then(() => {
      clearTimeout(timer);
      const mark = { open: true };
      // Only the callback runs in the marked context: after-commit hooks (which may open the next
      // transaction, as the job runner does) queue like anyone else.
      const body = fn as (t: unknown) => unknown;
      return original(options, (t: unknown) => inside.run(mark, () => body(t))).finally(() => {
        mark.open = false;
        release();
      });
    });
  };
  (sequelize as unknown as { transaction: typeof gated }).transaction = gated;
}

export function isPostgres(sequelize: Sequelize): boolean {
  return sequelize.getDialect() === 'postgres';
}

/**
 * SQLite file settings (page size, WAL) and foreign keys; nothing on Postgres. The busy timeout and
 * the sync level are set on every connection as it is handed out (configureEachConnection).
 */
export async function applyPragmas(sequelize: Sequelize): Promise<void> {
  if (isPostgres(sequelize)) return;
  // 8 KiB pages for a new, empty file (no effect on an existing one, and none once WAL is on): an
  // estimate run row is about 2.4 kB, so a 4 KiB page held one row and about 1.7 kB of nothing.
  await sequelize.query('PRAGMA page_size = 8192;');
  await sequelize.query('PRAGMA journal_mode = WAL;');
  await sequelize.query('PRAGMA foreign_keys = ON;');
}

/** Where a target is, for messages: the SQLite path, or the Postgres URL without its password. */
export function describeTarget(target: string): string {
  if (!isPostgresTarget(target)) return target;
  try {
    const u = new URL(target);
    if (u.password) u.password = '***';
    return u.toString();
  } catch {
    return 'the Postgres database';
  }
}
