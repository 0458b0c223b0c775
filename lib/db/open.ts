import fs from 'node:fs';
import path from 'node:path';
import { Sequelize } from 'sequelize';
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
  });
  // Sequelize opens one sqlite connection per transaction; each gets foreign
  // keys and a busy timeout so concurrent writers wait instead of failing.
  sequelize.addHook('afterConnect', (connection: unknown) => {
    const db = connection as sqlite3.Database;
    db.configure('busyTimeout', 5000);
    db.run('PRAGMA foreign_keys = ON');
    // Per connection: with WAL, NORMAL syncs at checkpoints instead of on every commit (a crash of the
    // process loses nothing; a power cut may lose the last commits), as the main connection does.
    db.run('PRAGMA synchronous = NORMAL');
  });
  return sequelize;
}

export function isPostgres(sequelize: Sequelize): boolean {
  return sequelize.getDialect() === 'postgres';
}

/** SQLite connection settings (WAL, foreign keys, busy timeout); nothing on Postgres. */
export async function applyPragmas(sequelize: Sequelize): Promise<void> {
  if (isPostgres(sequelize)) return;
  // 8 KiB pages for a new, empty file (no effect on an existing one, and none once WAL is on): an
  // estimate run row is about 2.4 kB, so a 4 KiB page held one row and about 1.7 kB of nothing.
  await sequelize.query('PRAGMA page_size = 8192;');
  await sequelize.query('PRAGMA journal_mode = WAL;');
  await sequelize.query('PRAGMA foreign_keys = ON;');
  await sequelize.query('PRAGMA busy_timeout = 5000;');
  await sequelize.query('PRAGMA synchronous = NORMAL;');
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
