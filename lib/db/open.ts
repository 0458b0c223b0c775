import fs from 'node:fs';
import path from 'node:path';
import { Sequelize } from 'sequelize';
import sqlite3 from 'sqlite3';

/**
 * Opens a Sequelize instance on a SQLite file. Shared by the app singleton
 * (lib/db.ts) and the operator scripts (migrate, seed, token).
 */
export function createSequelize(file: string): Sequelize {
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

export async function applyPragmas(sequelize: Sequelize): Promise<void> {
  await sequelize.query('PRAGMA journal_mode = WAL;');
  await sequelize.query('PRAGMA foreign_keys = ON;');
  await sequelize.query('PRAGMA busy_timeout = 5000;');
  await sequelize.query('PRAGMA synchronous = NORMAL;');
}
