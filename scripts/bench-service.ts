/**
 * Service benchmark (issue 10): the production server under load.
 *
 *   npm run build && npm run bench:service -- --json [--duration 30] [--connections 16] [--skip-heavy]
 *
 * 1. Makes a temporary data folder, migrates and seeds it, mints a bearer
 *    token for engineer@steerwise.test, starts `next start` (NODE_ENV=production,
 *    the bundled compute worker) on a free port.
 * 2. service-16x30s: autocannon, 16 connections for 30 s of
 *    POST /api/v1/estimates with one inline snapshot set (M = 16, N = 1000,
 *    two sources at −12° and 20°, 10 dB, d = λ/2, LS-ESPRIT, K = 2, no spectrum),
 *    after a warm-up. Prints p50/p99 latency, requests per second, errors
 *    (non-2xx, socket errors and timeouts) and the server's peak RSS (the
 *    process tree, sampled every 100 ms). Also the database growth per run:
 *    main file + WAL after a TRUNCATE checkpoint, before and after, divided by
 *    the runs added (the snapshot set is stored once, so this is the row cost).
 * 3. health-under-load: uploads a ~100 MB CSV (16 elements), starts a study
 *    and an estimate on that dataset, and measures GET /api/health (2
 *    connections) while both run.
 *
 * Goals (not tests): p99 ≤ 200 ms, ≥ 100 req/s, 0 errors, RSS ≤ 600 MB;
 * health p99 ≤ 50 ms; < 2 KB of database per inline run.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import autocannon from 'autocannon';
import sqlite3 from 'sqlite3';
import { inlineEstimateBody } from './inline-estimate-body';

const args = process.argv.slice(2);
const flag = (name: string) => args.includes(`--${name}`);
const option = (name: string, fallback: number) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 ? Number(args[i + 1]) : fallback;
};
const asJson = flag('json');
const duration = option('duration', 30);
const connections = option('connections', 16);
const root = path.resolve(__dirname, '..');

function log(msg: string) {
  if (!asJson) console.log(msg);
  else process.stderr.write(`${msg}\n`);
}

async function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const srv = net.createServer().listen(0, () => {
      const port = (srv.address() as net.AddressInfo).port;
      srv.close(() => resolve(port));
    });
  });
}

function treeRssMb(pid: number): number {
  const pids = [pid];
  for (const entry of fs.readdirSync('/proc')) {
    if (!/^\d+$/.test(entry)) continue;
    try {
      const stat = fs.readFileSync(`/proc/${entry}/stat`, 'utf8');
      const ppid = Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]);
      if (pids.includes(ppid)) pids.push(Number(entry));
    } catch {
      /* gone */
    }
  }
  let kb = 0;
  for (const p of pids) {
    try {
      const m = /VmRSS:\s+(\d+)/.exec(fs.readFileSync(`/proc/${p}/status`, 'utf8'));
      if (m) kb += Number(m[1]);
    } catch {
      /* gone */
    }
  }
  return kb / 1024;
}

function dbBytes(file: string): Promise<number> {
  return new Promise((resolve, reject) => {
    const db = new sqlite3.Database(file);
    db.run('PRAGMA busy_timeout = 10000');
    db.run('PRAGMA wal_checkpoint(TRUNCATE)', (err) => {
      db.close();
      if (err) return reject(err);
      const size = (f: string) => (fs.existsSync(f) ? fs.statSync(f).size : 0);
      resolve(size(file) + size(`${file}-wal`));
    });
  });
}

function count(file: string, sql: string): Promise<number> {
  return new Promise((resolve, reject) => {
    const db = new sqlite3.Database(file, sqlite3.OPEN_READONLY);
    db.get(sql, (err, row: Record<string, number>) => {
      db.close();
      if (err) reject(err);
      else resolve(Object.values(row)[0]);
    });
  });
}

async function writeCsv(file: string, targetBytes: number, elements: number) {
  const out = fs.createWriteStream(file);
  let bytes = 0;
  let seed = 7;
  const rand = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648) * 2 - 1;
  while (bytes < targetBytes) {
    const lines: string[] = [];
    for (let i = 0; i < 2000; i++)
      lines.push(
        Array.from({ length: elements }, () => {
          const im = rand();
          return `${rand().toFixed(9)}${im < 0 ? '' : '+'}${im.toFixed(9)}j`;
        }).join(','),
      );
    const chunk = lines.join('\n') + '\n';
    bytes += chunk.length;
    if (!out.write(chunk)) await new Promise<void>((r) => out.once('drain', () => r()));
  }
  await new Promise<void>((r) => out.end(() => r()));
}

async function main() {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'steerwise-bench-'));
  const dbFile = path.join(dir, 'steerwise.sqlite');
  const port = await freePort();
  const env = {
    ...process.env,
    STEERWISE_DATA_DIR: dir,
    STEERWISE_DB: dbFile,
    STEERWISE_MAIL_SINK: 'off',
    NEXTAUTH_SECRET: 'bench-service-secret',
    NEXTAUTH_URL: `http://127.0.0.1:${port}`,
  };
  const tsx = path.join(root, 'node_modules', '.bin', 'tsx');
  for (const script of ['scripts/migrate.ts', 'scripts/seed.ts']) {
    const r = spawnSync(tsx, [script], { cwd: root, env, encoding: 'utf8' });
    if (r.status !== 0) throw new Error(`${script} failed: ${r.stderr}`);
  }
  const token = spawnSync(tsx, ['scripts/token.ts', '--email', 'engineer@steerwise.test'], {
    cwd: root,
    env,
    encoding: 'utf8',
  }).stdout.trim();
  if (
    !fs.existsSync(path.join(root, 'dist', 'jobs-worker.cjs')) ||
    !fs.existsSync(path.join(root, '.next', 'BUILD_ID'))
  ) {
    throw new Error('Build first: npm run build');
  }
  const server: ChildProcess = spawn(
    process.execPath,
    [path.join(root, 'node_modules', 'next', 'dist', 'bin', 'next'), 'start', '-p', String(port)],
    {
      cwd: root,
      env: { ...env, NODE_ENV: 'production' },
      stdio: ['ignore', 'ignore', 'inherit'],
    },
  );
  const base = `http://127.0.0.1:${port}`;
  const auth = { authorization: `Bearer ${token}` };
  try {
    for (let i = 0; ; i++) {
      const ok = await fetch(`${base}/api/health`)
        .then((r) => r.ok)
        .catch(() => false);
      if (ok) break;
      if (i > 600) throw new Error('the server did not start');
      await new Promise((r) => setTimeout(r, 100));
    }
    const body = inlineEstimateBody();
    const headers = { ...auth, 'content-type': 'application/json' };
    log(`request body ${(body.length / 1e6).toFixed(2)} MB; warming up`);
    for (let i = 0; i < 20; i++) {
      const r = await fetch(`${base}/api/v1/estimates`, { method: 'POST', headers, body });
      if (r.status !== 201) throw new Error(`warm-up estimate answered ${r.status}: ${await r.text()}`);
    }
    const runsBefore = await count(dbFile, 'SELECT count(*) FROM estimate_runs');
    const bytesBefore = await dbBytes(dbFile);
    let peakRss = 0;
    const sampler = setInterval(() => (peakRss = Math.max(peakRss, treeRssMb(server.pid!))), 100);
    const result = await autocannon({
      url: `${base}/api/v1/estimates`,
      method: 'POST',
      headers,
      body,
      connections,
      duration,
      timeout: 30,
    });
    clearInterval(sampler);
    const runsAfter = await count(dbFile, 'SELECT count(*) FROM estimate_runs');
    const bytesAfter = await dbBytes(dbFile);
    const errors = result.errors + result.timeouts + result.non2xx;
    const line1 = {
      case: `service-${connections}x${duration}s`,
      p50Ms: result.latency.p50,
      p99Ms: result.latency.p99,
      rps: Math.round(result.requests.average * 10) / 10,
      errors,
      rssMb: Math.round(peakRss),
      runs: runsAfter - runsBefore,
      dbBytesPerRun: Math.round((bytesAfter - bytesBefore) / Math.max(1, runsAfter - runsBefore)),
    };
    console.log(asJson ? JSON.stringify(line1) : line1);

    if (!flag('skip-heavy')) {
      const csv = path.join(dir, 'bench-100mb.csv');
      await writeCsv(csv, 100e6, 16);
      log('uploading a 100 MB CSV');
      const form = new FormData();
      form.append('file', new Blob([fs.readFileSync(csv)]), 'bench-100mb.csv');
      form.append('name', 'bench 100 MB');
      const up = await fetch(`${base}/api/v1/datasets`, { method: 'POST', headers: auth, body: form });
      if (up.status !== 201) throw new Error(`upload answered ${up.status}: ${await up.text()}`);
      const dataset = (await up.json()) as { id: number };
      fs.rmSync(csv);
      const study = await fetch(`${base}/api/v1/studies`, {
        method: 'POST',
        headers,
        body: JSON.stringify({
          name: 'bench study',
          array: { elements: 16, spacingWavelengths: 0.5 },
          sources: { bearingsDeg: [-10, 12], powersDb: [0, 0] },
          snapshots: 200,
          sweep: { variable: 'snr', values: [0, 5, 10, 15] },
          methods: ['music', 'esprit-tls'],
          trials: 200,
          seed: 5,
        }),
      }).then((r) => r.json() as Promise<{ id: number }>);
      const run = await fetch(`${base}/api/v1/estimates`, {
        method: 'POST',
        headers: { ...headers, prefer: 'respond-async' },
        body: JSON.stringify({
          method: 'esprit-ls',
          sourceCount: 2,
          datasetId: dataset.id,
          array: { elements: 16, spacingWavelengths: 0.5 },
        }),
      }).then((r) => r.json() as Promise<{ id: number }>);
      const health = await autocannon({ url: `${base}/api/health`, connections: 2, duration: 15 });
      const state = async (url: string) =>
        ((await fetch(url, { headers: auth }).then((r) => r.json())) as { status: string }).status;
      const line2 = {
        case: 'health-under-load',
        p99Ms: health.latency.p99,
        p50Ms: health.latency.p50,
        errors: health.errors + health.timeouts + health.non2xx,
        studyStatusAfter: await state(`${base}/api/v1/studies/${study.id}`),
        estimateStatusAfter: await state(`${base}/api/v1/estimates/${run.id}`),
      };
      console.log(asJson ? JSON.stringify(line2) : line2);
    }
  } finally {
    server.kill('SIGTERM');
    await new Promise((r) => setTimeout(r, 500));
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
