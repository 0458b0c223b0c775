/**
 * Crash safety of the production server (issue 10): a second `next start` on
 * its own temporary data folder is killed with SIGKILL (its whole process
 * group, worker threads included) while an upload is being received, an
 * estimate on a 40 MB dataset and a study run in the worker threads, and a
 * bundle import is in flight; then it is started again. Checked after the
 * restart: PRAGMA integrity_check = ok; no file in uploads/tmp, no stored file
 * without its row and no row without its file; every interrupted job either
 * re-ran to the same answer as an uninterrupted run of the same inputs
 * (consistency check) or failed with a reason its owner can read.
 * Uses the build the e2e setup makes (.next and dist/jobs-worker.cjs).
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import http from 'node:http';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import sqlite3 from 'sqlite3';
import { afterAll, describe, expect, it } from 'vitest';

const root = path.resolve(__dirname, '../..');
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'steerwise-crash-'));
const dbFile = path.join(dir, 'steerwise.sqlite');
let port = 0;
let server: ChildProcess | null = null;

const env = () => ({
  ...process.env,
  NODE_ENV: 'production' as const,
  STEERWISE_DATA_DIR: dir,
  STEERWISE_DB: dbFile,
  STEERWISE_MAIL_SINK: 'off',
  STEERWISE_JOB_LEASE_MS: '3000',
  NEXTAUTH_SECRET: 'crash-safety-secret',
  NEXTAUTH_URL: `http://127.0.0.1:${port}`,
});

function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const srv = net.createServer().listen(0, '127.0.0.1', () => {
      const p = (srv.address() as net.AddressInfo).port;
      srv.close(() => resolve(p));
    });
  });
}

function tsx(script: string, args: string[] = []): string {
  const r = spawnSync(process.execPath, [path.join(root, 'node_modules/tsx/dist/cli.mjs'), script, ...args], {
    cwd: root,
    env: { ...env(), NODE_ENV: 'development' },
    encoding: 'utf8',
  });
  if (r.status !== 0) throw new Error(`${script}: ${r.stderr}`);
  return r.stdout.trim();
}

async function start(): Promise<void> {
  server = spawn(
    process.execPath,
    [path.join(root, 'node_modules/next/dist/bin/next'), 'start', '-p', String(port), '-H', '127.0.0.1'],
    { cwd: root, env: env(), detached: true, stdio: 'ignore' },
  );
  for (let i = 0; i < 600; i++) {
    if (
      await fetch(`${base()}/api/health`)
        .then((r) => r.ok)
        .catch(() => false)
    )
      return;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error('server did not start');
}
function kill(signal: NodeJS.Signals): void {
  if (server?.pid) process.kill(-server.pid, signal);
  server = null;
}
const base = () => `http://127.0.0.1:${port}`;

function sql<T>(query: string): Promise<T[]> {
  return new Promise((resolve, reject) => {
    const db = new sqlite3.Database(dbFile, sqlite3.OPEN_READONLY);
    db.all(query, (err, rows) => {
      db.close();
      if (err) reject(err);
      else resolve(rows as T[]);
    });
  });
}

function csv(mb: number): Buffer {
  let seed = 11;
  const rand = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648) * 2 - 1;
  const lines: string[] = [];
  let bytes = 0;
  while (bytes < mb * 1e6) {
    const line = Array.from({ length: 16 }, () => {
      const im = rand();
      return `${rand().toFixed(7)}${im < 0 ? '' : '+'}${im.toFixed(7)}j`;
    }).join(',');
    lines.push(line);
    bytes += line.length + 1;
  }
  return Buffer.from(lines.join('\n') + '\n');
}

afterAll(() => {
  if (server) kill('SIGTERM');
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('SIGKILL during an upload, an estimate, a study and a bundle import', () => {
  it(
    'restarts clean: integrity ok, no orphans, interrupted jobs re-ran to the same answer or failed with a reason',
    { timeout: 600_000 },
    async () => {
      port = await freePort();
      tsx('scripts/migrate.ts');
      tsx('scripts/seed.ts');
      const token = tsx('scripts/token.ts', ['--email', 'engineer@steerwise.test']);
      const auth = { authorization: `Bearer ${token}` };
      const json = { ...auth, 'content-type': 'application/json' };
      await start();

      // A 40 MB dataset, stored before the crash.
      const form = new FormData();
      form.append('file', new Blob([new Uint8Array(csv(40))]), 'crash-40mb.csv');
      const up = await fetch(`${base()}/api/v1/datasets`, { method: 'POST', headers: auth, body: form });
      expect(up.status).toBe(201);
      const dataset = (await up.json()) as { id: number };
      const estimateBody = {
        datasetId: dataset.id,
        array: { elements: 16, spacingWavelengths: 0.5 },
        methods: ['esprit-ls', 'esprit-tls', 'root-music'],
        sourceCount: 2,
      };
      const studyBody = {
        name: 'crash check',
        array: { elements: 12, spacingWavelengths: 0.5 },
        sources: { bearingsDeg: [-10, 15], powersDb: [0, 0] },
        snapshots: 100,
        sweep: { variable: 'snr', values: [0, 10] },
        methods: ['esprit-tls'],
        trials: 1500,
        seed: 9,
      };
      // A bundle to import while the server dies: the demo array with the dataset.
      const arrays = (await (await fetch(`${base()}/api/v1/arrays`, { headers: auth })).json()) as {
        items: { id: number; elements: number }[];
      };
      const array16 = arrays.items.find((a) => a.elements === 16) ?? arrays.items[0];
      const bundle = Buffer.from(
        await (await fetch(`${base()}/api/v1/arrays/${array16.id}/bundle`, { headers: auth })).arrayBuffer(),
      );

      const run = (await (
        await fetch(`${base()}/api/v1/estimates`, {
          method: 'POST',
          headers: { ...json, prefer: 'respond-async' },
          body: JSON.stringify(estimateBody),
        })
      ).json()) as { id: number };
      const study = (await (
        await fetch(`${base()}/api/v1/studies`, { method: 'POST', headers: json, body: JSON.stringify(studyBody) })
      ).json()) as { id: number };

      // An upload that keeps sending slowly until the server dies.
      const boundary = 'crashboundary';
      const upload = http.request(`${base()}/api/v1/datasets`, {
        method: 'POST',
        headers: { ...auth, 'content-type': `multipart/form-data; boundary=${boundary}` },
      });
      upload.on('error', () => undefined);
      upload.write(
        `--${boundary}\r\ncontent-disposition: form-data; name="file"; filename="slow.csv"\r\ncontent-type: text/csv\r\n\r\n`,
      );
      const chunk = csv(1);
      const feeder = setInterval(() => upload.write(chunk), 50);
      // The bundle import, sent as the server is about to die.
      const importForm = new FormData();
      importForm.append('file', new Blob([new Uint8Array(bundle)]), 'handoff.zip');

      const status = async (url: string) =>
        (await (await fetch(url, { headers: auth })).json()) as { status: string; error: string | null };
      for (let i = 0; i < 600; i++) {
        const [r, s] = [
          await status(`${base()}/api/v1/estimates/${run.id}`),
          await status(`${base()}/api/v1/studies/${study.id}`),
        ];
        const tmp = fs.readdirSync(path.join(dir, 'uploads', 'tmp')).length;
        if (r.status === 'running' && s.status === 'running' && tmp > 0) break;
        await new Promise((res) => setTimeout(res, 50));
      }
      void fetch(`${base()}/api/v1/bundles`, { method: 'POST', headers: auth, body: importForm }).catch(
        () => undefined,
      );
      await new Promise((res) => setTimeout(res, 150));
      expect(
        (
          await sql<{ status: string }>(
            `SELECT status FROM jobs WHERE kind IN ('estimate','study') AND status = 'running'`,
          )
        ).length,
      ).toBe(2);
      kill('SIGKILL');
      clearInterval(feeder);
      upload.destroy();
      const leftovers = fs.readdirSync(path.join(dir, 'uploads', 'tmp'));
      expect(leftovers.length).toBeGreaterThan(0); // the half-received upload

      await start();
      const settle = async (url: string) => {
        for (let i = 0; i < 1200; i++) {
          const s = await status(url);
          if (['done', 'failed', 'cancelled'].includes(s.status)) return s;
          await new Promise((res) => setTimeout(res, 250));
        }
        throw new Error(`${url} did not finish`);
      };
      const runAfter = (await settle(`${base()}/api/v1/estimates/${run.id}`)) as unknown as {
        status: string;
        error: string | null;
        results: { bearingsDeg: number[] }[];
      };
      const studyAfter = (await settle(`${base()}/api/v1/studies/${study.id}`)) as unknown as {
        status: string;
        error: string | null;
        result: { points: unknown[] } | null;
      };
      // Uninterrupted runs of the same inputs (consistency check).
      const control = (await (
        await fetch(`${base()}/api/v1/estimates`, {
          method: 'POST',
          headers: { ...json, prefer: 'respond-async' },
          body: JSON.stringify(estimateBody),
        })
      ).json()) as { id: number };
      const controlStudy = (await (
        await fetch(`${base()}/api/v1/studies`, { method: 'POST', headers: json, body: JSON.stringify(studyBody) })
      ).json()) as { id: number };
      const runControl = (await settle(`${base()}/api/v1/estimates/${control.id}`)) as unknown as {
        results: { bearingsDeg: number[] }[];
      };
      const studyControl = (await settle(`${base()}/api/v1/studies/${controlStudy.id}`)) as unknown as {
        result: { points: unknown[] };
      };
      if (runAfter.status === 'done')
        expect(runAfter.results.map((r) => r.bearingsDeg)).toEqual(runControl.results.map((r) => r.bearingsDeg));
      else expect(runAfter.error).toMatch(/server stopped/);
      if (studyAfter.status === 'done') expect(studyAfter.result!.points).toEqual(studyControl.result.points);
      else expect(studyAfter.error).toMatch(/server stopped/);
      kill('SIGTERM');
      await new Promise((res) => setTimeout(res, 1000));

      expect(await sql<{ integrity_check: string }>('PRAGMA integrity_check')).toEqual([{ integrity_check: 'ok' }]);
      expect(fs.readdirSync(path.join(dir, 'uploads', 'tmp'))).toEqual([]);
      const stored = new Set(
        (await sql<{ storagePath: string }>('SELECT storagePath FROM datasets')).map((r) => r.storagePath),
      );
      const onDisk: string[] = [];
      const walk = (d: string) => {
        for (const e of fs.readdirSync(path.join(dir, d), { withFileTypes: true })) {
          if (e.isDirectory()) walk(path.join(d, e.name));
          else onDisk.push(path.join(d, e.name));
        }
      };
      walk('datasets');
      expect(onDisk.sort()).toEqual([...stored].sort());
      expect(await sql(`SELECT id FROM jobs WHERE status IN ('queued', 'running')`)).toEqual([]);
      expect(await sql(`SELECT id FROM estimate_runs WHERE status IN ('queued', 'running')`)).toEqual([]);
    },
  );
});
