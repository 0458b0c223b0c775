/**
 * Counters and one-time claims under concurrent writers. Runs in the api project (SQLite) and in api-pg
 * (Postgres, tests/helpers/pg-global-setup.ts), where the same requests run on separate pooled connections:
 * the revision counter (row lock on Postgres, immediate transaction on SQLite), the rate-limit counter (one
 * upsert with RETURNING), a one-time link used by simultaneous submissions (conditional update), and the
 * JSON path query that finds a run by its snapshot set (json_extract on SQLite, ->> on JSONB on Postgres).
 * The rate-limit and link cases run on Postgres only.
 */
import { describe, expect, it } from 'vitest';
import { ArrayRevision, AuthLink, EstimateRun } from '@/models';
import { getDb } from '@/lib/db';
import { countHit } from '@/lib/auth/rate-limit';
import { completeLink } from '@/lib/data/links';
import { randomSecret, sha256Hex } from '@/lib/auth/secrets';
import { isSnapshotSetReferenced } from '@/lib/storage/snapshots';
import * as arrays from '@/app/api/v1/arrays/route';
import * as arrayById from '@/app/api/v1/arrays/[id]/route';
import * as estimates from '@/app/api/v1/estimates/route';
import { browserHeaders, json, params, req, userOf } from '../helpers/api';

// Many writers at once in one process is the Postgres deployment's case; the embedded SQLite server
// serialises writers on its file lock (its rate-limit and link tests are in their own files).
const onPostgres = process.env.STEERWISE_TEST_ON_PG === '1';

describe('concurrent writers', () => {
  it('runs on the database its project names (api: SQLite, api-pg: Postgres)', async () => {
    const db = await getDb();
    expect(db.getDialect()).toBe(onPostgres ? 'postgres' : 'sqlite');
  });

  it.runIf(onPostgres)('a run result is stored out of line without compression (migration 0007)', async () => {
    const db = await getDb();
    const [rows] = (await db.query(
      `SELECT attstorage FROM pg_attribute WHERE attrelid = 'estimate_runs'::regclass AND attname = 'result'`,
    )) as [{ attstorage: string }[], unknown];
    expect(rows[0]?.attstorage).toBe('e');
  });

  it('eight simultaneous saves of one array give revisions 2…9, each once, and the counter ends at 9', async () => {
    const created = await arrays.POST(
      req('POST', '/api/v1/arrays', {
        body: { name: 'Concurrency line', elements: 8, spacing: { value: 0.5, unit: 'wavelength' } },
        headers: await browserHeaders('engineer'),
      }),
      params({}),
    );
    expect(created.status).toBe(201);
    const { id } = (await json(created)) as { id: number };
    const headers = await browserHeaders('engineer');
    const answers = await Promise.all(
      Array.from({ length: 8 }, (_, i) =>
        arrayById.PATCH(
          req('PATCH', `/api/v1/arrays/${id}`, { body: { name: `Concurrency line ${i}` }, headers }),
          params({ id: String(id) }),
        ),
      ),
    );
    const statuses = answers.map((a) => a.status);
    // Every save either lands as the next revision or is refused as a conflict; never a duplicate revision.
    expect(statuses.every((s) => s === 200 || s === 409)).toBe(true);
    const saved = statuses.filter((s) => s === 200).length;
    const revisions = (await ArrayRevision.findAll({ where: { arrayId: id }, order: [['revision', 'ASC']] })).map(
      (r) => r.revision,
    );
    expect(revisions).toEqual(Array.from({ length: saved + 1 }, (_, i) => i + 1));
    const db = await getDb();
    // Postgres serialises them on the row lock: all eight land.
    if (db.getDialect() === 'postgres') expect(saved).toBe(8);
    const latest = (await json(
      await arrayById.GET(req('GET', `/api/v1/arrays/${id}`, { headers }), params({ id: String(id) })),
    )) as {
      latestRevision?: number;
      revision?: number;
    };
    expect(latest.latestRevision ?? latest.revision).toBe(saved + 1);
  });

  it.runIf(onPostgres)('twenty simultaneous hits on one rate-limit key count 1…20, each once', async () => {
    const key = `test:concurrency:${Date.now()}`;
    const counts = await Promise.all(Array.from({ length: 20 }, () => countHit({ key, windowMs: 60_000 })));
    expect([...counts].sort((a, b) => a - b)).toEqual(Array.from({ length: 20 }, (_, i) => i + 1));
  });

  it.runIf(onPostgres)('a one-time link submitted five times at once is used once', async () => {
    const secret = randomSecret('lk_', 24);
    const viewer = await userOf('viewer');
    await AuthLink.create({
      teamId: viewer.teamId,
      purpose: 'reset',
      email: 'viewer@steerwise.test',
      tokenHash: sha256Hex(secret),
      expiresAt: new Date(Date.now() + 3600_000),
    } as never);
    const outcomes = await Promise.allSettled(
      Array.from({ length: 5 }, () => completeLink({ input: { token: secret, password: 'a-long-new-password-1' } })),
    );
    expect(outcomes.filter((o) => o.status === 'fulfilled')).toHaveLength(1);
    for (const o of outcomes)
      if (o.status === 'rejected') expect(String((o.reason as Error).message)).toMatch(/already been used|used/i);
  });

  it('finds a run by its snapshot set through a JSON path query', async () => {
    expect(await isSnapshotSetReferenced(`snapshots/ab/${'ab'.repeat(32)}.c128`)).toBe(false);
    const res = await estimates.POST(
      req('POST', '/api/v1/estimates', {
        body: {
          method: 'esprit-ls',
          sourceCount: 1,
          array: { elements: 4, spacingWavelengths: 0.5 },
          snapshots: {
            re: [
              [1, 0, -1, 0],
              [0, 1, 0, -1],
              [1, 1, 1, 0],
            ],
            im: [
              [0, 1, 0, -1],
              [1, 0, -1, 0],
              [0, 0, 0, 1],
            ],
          },
        },
        headers: await browserHeaders('engineer'),
      }),
      params({}),
    );
    expect(res.status).toBe(201);
    const run = await EstimateRun.findByPk(Number(res.headers.get('location')!.split('/').pop()));
    const ref = (run!.inputs as { snapshotSet: { path: string } }).snapshotSet;
    expect(await isSnapshotSetReferenced(ref.path)).toBe(true);
  });
});
