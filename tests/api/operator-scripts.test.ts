/**
 * The operator commands as a user runs them: migrate (up, down, up again),
 * the idempotent demo seed, and `npm run --silent token` printing only a
 * token that then works as a bearer credential.
 */
import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { describe, expect, it } from 'vitest';
import { applyPragmas, createSequelize } from '@/lib/db/open';
import { createMigrator, migrateUp } from '@/lib/db/migrate';
import { seedDemo } from '@/lib/demo/seed';
import { AuditEvent, Team, User } from '@/models';
import * as account from '@/app/api/account/route';
import { json, params, req } from '../helpers/api';

const run = promisify(execFile);

describe('migrations', () => {
  it('apply on an empty file, roll back completely, and apply again', async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'steerwise-mig-'));
    const sequelize = createSequelize(path.join(dir, 'm.sqlite'));
    try {
      await applyPragmas(sequelize);
      const applied = await migrateUp(sequelize);
      expect(applied[0]).toBe('0001-initial');
      const tables = async () => (await sequelize.getQueryInterface().showAllTables()).map(String).sort();
      expect(await tables()).toEqual(
        expect.arrayContaining([
          'api_tokens',
          'audit_events',
          'auth_links',
          'outbox_messages',
          'rate_limits',
          'teams',
          'users',
        ]),
      );
      const mode = (await sequelize.query('PRAGMA journal_mode', { plain: true })) as { journal_mode: string } | null;
      expect(mode?.journal_mode).toBe('wal');
      expect(await migrateUp(sequelize)).toEqual([]);
      await createMigrator(sequelize).down({ to: 0 });
      expect((await tables()).filter((t) => t !== 'schema_migrations')).toEqual([]);
      expect((await migrateUp(sequelize)).length).toBe(applied.length);
    } finally {
      await sequelize.close();
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });

  it('foreign keys are enforced', async () => {
    await expect(
      User.create({
        email: 'orphan@steerwise.test',
        name: 'Orphan',
        passwordHash: 'x',
        role: 'viewer',
        teamId: 999_999,
      }),
    ).rejects.toThrow(/FOREIGN KEY/);
  });
});

describe('demo seed', () => {
  it('is idempotent: a second run adds nothing', async () => {
    const before = { teams: await Team.count(), users: await User.count(), audit: await AuditEvent.count() };
    const { getDb } = await import('@/lib/db');
    const again = await seedDemo(await getDb());
    expect(again.created).toBe(false);
    expect({ teams: await Team.count(), users: await User.count(), audit: await AuditEvent.count() }).toEqual(before);
    const roles = (await User.findAll({ where: { teamId: again.teamId } })).map((u) => `${u.role}:${u.email}`).sort();
    expect(roles).toEqual([
      'admin:admin@steerwise.test',
      'engineer:engineer@steerwise.test',
      'reviewer:reviewer@steerwise.test',
      'viewer:viewer@steerwise.test',
    ]);
  });
});

describe('npm run --silent token -- --email <email>', () => {
  it('prints only a new token, which then authenticates as that user', async () => {
    const { stdout, stderr } = await run(
      'npm',
      ['run', '--silent', 'token', '--', '--email', 'reviewer@steerwise.test'],
      { env: process.env, cwd: process.cwd() },
    );
    expect(stderr).toBe('');
    expect(stdout).toMatch(/^sw_[A-Za-z0-9_-]{43}\n$/);
    const res = await account.GET(
      req('GET', '/api/account', { headers: { authorization: `Bearer ${stdout.trim()}` } }),
      params({}),
    );
    expect(res.status).toBe(200);
    expect((await json(res)).email).toBe('reviewer@steerwise.test');
  }, 60_000);

  it('an unknown e-mail exits non-zero with the reason on stderr and nothing on stdout', async () => {
    const err = await run('npm', ['run', '--silent', 'token', '--', '--email', 'ghost@steerwise.test'], {
      env: process.env,
      cwd: process.cwd(),
    }).catch((e: { code: number; stdout: string; stderr: string }) => e);
    expect((err as { code: number }).code).toBe(1);
    expect((err as { stdout: string }).stdout).toBe('');
    expect((err as { stderr: string }).stderr).toMatch(/No user with e-mail ghost@steerwise.test/);
  }, 60_000);
});
