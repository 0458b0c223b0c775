/**
 * Runs before every test file of the api project: points the app at a fresh
 * temporary SQLite file (and data folder), migrates it and seeds the demo
 * teams. Nothing is mocked; handlers use the real database. In the api-pg
 * project (STEERWISE_TEST_PG_URL set by tests/helpers/pg-global-setup.ts) the
 * database is a fresh Postgres database on the throwaway cluster instead.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { AsyncLocalStorage } from 'node:async_hooks';
import { afterAll, beforeAll } from 'vitest';

// As in Next's server runtime: its request stores need this global before they load (tests/helpers/next-request-scope.ts).
(globalThis as { AsyncLocalStorage?: unknown }).AsyncLocalStorage ??= AsyncLocalStorage;

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'steerwise-api-'));
process.env.STEERWISE_DATA_DIR = dir;
process.env.STEERWISE_DB = path.join(dir, 'test.sqlite');
process.env.NEXTAUTH_SECRET = 'test-secret-for-api-tests';
process.env.NEXTAUTH_URL = 'http://localhost:3000';
delete process.env.SMTP_HOST;
// The demo bearing–time record (lib/demo/bearing-time.ts) takes seconds to simulate and analyse: only tests that need it seed it.
process.env.STEERWISE_SEED_BTR ??= '0';

// Only the api-pg project (its `env` in vitest.config.mts) uses the cluster: in a run of every project the
// cluster's URL is in every worker's environment, and the api project must stay on SQLite.
const pgBase = process.env.STEERWISE_TEST_ON_PG === '1' ? process.env.STEERWISE_TEST_PG_URL : undefined;
if (!pgBase) delete process.env.DATABASE_URL;
let pgName: string | undefined;

beforeAll(async () => {
  if (pgBase) {
    const { Client } = await import('pg');
    pgName = `t_${process.pid}_${Date.now().toString(36)}_${Math.random().toString(36).slice(2, 8)}`;
    const admin = new Client({ connectionString: pgBase });
    await admin.connect();
    await admin.query(`CREATE DATABASE ${pgName}`);
    await admin.end();
    const url = new URL(pgBase);
    url.pathname = `/${pgName}`;
    process.env.DATABASE_URL = url.toString();
  }
  const { getDb } = await import('@/lib/db');
  const { migrateUp } = await import('@/lib/db/migrate');
  const { seedDemo } = await import('@/lib/demo/seed');
  const db = await getDb();
  await migrateUp(db);
  await seedDemo(db);
});

afterAll(async () => {
  const { stopJobRunner } = await import('@/lib/jobs');
  const { closePool } = await import('@/lib/jobs/pool');
  await stopJobRunner();
  await closePool();
  const { closeDb } = await import('@/lib/db');
  await closeDb();
  if (pgBase && pgName) {
    const { Client } = await import('pg');
    const admin = new Client({ connectionString: pgBase });
    await admin.connect();
    await admin.query(`DROP DATABASE IF EXISTS ${pgName} WITH (FORCE)`).catch(() => undefined);
    await admin.end();
  }
  fs.rmSync(dir, { recursive: true, force: true });
});
