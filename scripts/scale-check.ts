/**
 * npm run scale:check — the larger-team layout on one machine (README, "Running for a larger team"):
 * a throwaway PostgreSQL cluster (scripts/pg-cluster.ts), the S3 fake s3rver as the shared file store, 2 web processes (`next start`, STEERWISE_RUN_JOBS=0,
 * so they only store and enqueue) and compute workers (`npm run worker`) sharing one database, one pg-boss queue
 * and one data folder.
 *
 * 1. workers = 1: `A` estimates are queued through both web processes with no worker running; then one worker
 *    process with one compute thread (STEERWISE_WORKERS=1) starts, and the throughput is the jobs over the span
 *    from the first job's start to the last one's end (jobs table).
 * 2. workers = 2: the same with `A` more estimates and two such worker processes (two processes, one thread each:
 *    one process with one thread is the baseline, so the ratio is the scaling across processes).
 * 3. kill: the remaining estimates (200 in all) and 4 studies are queued, two workers run them and one is killed
 *    with SIGKILL when about a quarter is done; the other re-runs what the dead one held (lease sweep → re-queue →
 *    new queue message).
 *
 * Every job must end done, its result stored exactly once (workers log one `job-stored` line per stored result,
 * STEERWISE_JOB_LOG=1), with bearings equal to the single-process mode's: the same compute (lib/jobs/compute.ts)
 * run here in-process, on the stored inputs, one job after the other. Prints JSON lines
 * {"case":"scale-workers","workers":1|2,"jobsPerSecond":…} and {"case":"scale-kill","lost":…,"duplicated":…}.
 *
 * Needs `npm run build` first (it runs it when .next/BUILD_ID is missing or older than the sources). Options:
 * --per-phase N (default 60); --s3 (the S3 fake as the file store); --throughput-only (no kill test);
 * --no-build (keep the build as it is: for experiments on the worker side). Each throughput line carries
 * the CPU per job of each process group (cpuPerJobMs), to show where a phase's time goes.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import { createRequire } from 'node:module';
import pg from 'pg';
import { simulateSnapshots } from '../lib/doa/sim/simulate';
import { freePort, startPgCluster, type PgCluster } from './pg-cluster';
import { startS3Fake, type S3Fake } from './s3-fake';

const require_ = createRequire(import.meta.url);
const serverOnly = require_.resolve('server-only');
require_.cache[serverOnly] = { id: serverOnly, filename: serverOnly, loaded: true, exports: {} } as NodeJS.Module;

const root = path.resolve(path.dirname(new URL(import.meta.url).pathname), '..');
const args = process.argv.slice(2);
// --s3: the file store is the S3 fake s3rver (each worker with a data folder of its own, filled from the bucket).
const useS3 = args.includes('--s3');
const perPhase = args.includes('--per-phase') ? Number(args[args.indexOf('--per-phase') + 1]) : 60;
const TOTAL_ESTIMATES = 200;
const STUDIES = 4;
const M = 16;
const N = 1000;

const children: ChildProcess[] = [];
const logs = new Map<ChildProcess, string[]>();

function spawnLogged(name: string, cmd: string, argv: string[], env: NodeJS.ProcessEnv): ChildProcess {
  const child = spawn(cmd, argv, { cwd: root, env, stdio: ['ignore', 'pipe', 'pipe'] });
  const lines: string[] = [];
  logs.set(child, lines);
  let rest = '';
  const take = (d: Buffer) => {
    rest += d.toString();
    const parts = rest.split('\n');
    rest = parts.pop() ?? '';
    for (const l of parts) {
      lines.push(l);
      if (process.env.SCALE_CHECK_VERBOSE) console.error(`[${name}] ${l}`);
    }
  };
  child.stdout!.on('data', take);
  child.stderr!.on('data', take);
  children.push(child);
  return child;
}

function runSync(argv: string[], env: NodeJS.ProcessEnv): string {
  const r = spawnSync(path.join(root, 'node_modules/.bin/tsx'), argv, { cwd: root, env, encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`tsx ${argv.join(' ')} failed: ${r.stderr}${r.stdout}`);
  return r.stdout;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function waitFor<T>(what: string, fn: () => Promise<T | undefined | false>, timeoutMs = 120_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn().catch(() => undefined);
    if (v) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await sleep(250);
  }
}

function estimateBody(i: number): string {
  const x = simulateSnapshots({
    elements: M,
    spacingWavelengths: 0.5,
    bearingsDeg: [-30 + (i % 20), 10 + (i % 7) * 3],
    powers: [10, 10],
    noisePower: 1,
    snapshots: N,
    seed: 1000 + i,
  });
  const re: number[][] = [];
  const im: number[][] = [];
  for (let s = 0; s < N; s++) {
    re.push(Array.from({ length: M }, (_, e) => x.re[e * N + s]));
    im.push(Array.from({ length: M }, (_, e) => x.im[e * N + s]));
  }
  return JSON.stringify({
    methods: ['esprit-ls', 'esprit-tls', 'esprit-unitary', 'music', 'root-music', 'bartlett', 'mvdr'],
    sourceCount: 2,
    // With the spectra (MUSIC, Bartlett, MVDR scans) a job is a few hundred ms of compute, so the check measures
    // the workers rather than the per-job database round trips.
    includeSpectrum: true,
    array: { elements: M, spacingWavelengths: 0.5 },
    snapshots: { re, im },
  });
}

function studyBody(i: number): string {
  return JSON.stringify({
    name: `Scale check study ${i + 1}`,
    array: { elements: 10, spacingWavelengths: 0.5 },
    sources: { bearingsDeg: [0], powersDb: [0] },
    snapshots: 100,
    sweep: { variable: 'snr', values: [0, 10] },
    methods: ['root-music', 'esprit-tls'],
    trials: 60,
    seed: 11 + i,
  });
}

/**
 * One POST on a connection of its own (no keep-alive): a reused idle connection that the server closes
 * (next start's 5 s keep-alive timeout) just as a 0.6 MB body is written to it ends in EPIPE on a loaded
 * machine, which is how this check's first batch sometimes failed; a POST must not be retried blindly.
 */
function post(base: string, token: string, route: string, body: string): Promise<number> {
  return new Promise((resolve, reject) => {
    const url = new URL(`${base}${route}`);
    const req = http.request(
      {
        host: url.hostname,
        port: url.port,
        path: url.pathname,
        method: 'POST',
        agent: false,
        headers: {
          authorization: `Bearer ${token}`,
          'content-type': 'application/json',
          'content-length': Buffer.byteLength(body),
          prefer: 'respond-async',
          connection: 'close',
        },
      },
      (res) => {
        let text = '';
        res.setEncoding('utf8');
        res.on('data', (d: string) => (text += d));
        res.on('end', () => {
          if (res.statusCode !== 202)
            reject(new Error(`POST ${route} answered ${res.statusCode}: ${text.slice(0, 300)}`));
          else resolve((JSON.parse(text) as { id: number }).id);
        });
        res.on('error', reject);
      },
    );
    req.on('error', reject);
    req.end(body);
  });
}

interface JobRow {
  id: number;
  kind: string;
  inputRef: string;
  status: string;
  attempts: number;
  startedAt: Date | null;
  finishedAt: Date | null;
}

async function jobsFor(client: pg.Client, kind: string, refs: number[]): Promise<JobRow[]> {
  const { rows } = await client.query<JobRow>(
    `SELECT id, kind, "inputRef", status, attempts, "startedAt", "finishedAt" FROM jobs WHERE kind = $1 AND "inputRef" = ANY($2)`,
    [kind, refs.map(String)],
  );
  return rows;
}

async function allEnded(client: pg.Client, kind: string, refs: number[]): Promise<JobRow[] | undefined> {
  const rows = await jobsFor(client, kind, refs);
  return rows.length === refs.length && rows.every((r) => ['done', 'failed', 'cancelled'].includes(r.status))
    ? rows
    : undefined;
}

function startWorker(env: NodeJS.ProcessEnv, name: string): ChildProcess {
  // node --import tsx (not the tsx CLI, which runs the script in a child process): the pid is the worker's own.
  return spawnLogged(name, process.execPath, ['--import', 'tsx', 'scripts/worker.ts'], {
    ...env,
    STEERWISE_WORKERS: '1',
    // Booted (compute thread started, bundle loaded), then waiting for the gate file: see startWorkers.
    STEERWISE_WORKER_GATE: gateFile(env, name),
    // With S3 each worker has its own data folder (files come from the bucket); otherwise they share the web's.
    ...(useS3 ? { STEERWISE_DATA_DIR: fs.mkdtempSync(path.join(env.STEERWISE_DATA_DIR!, `${name}-`)) } : {}),
  });
}

function gateFile(env: NodeJS.ProcessEnv, name: string): string {
  return path.join(env.STEERWISE_DATA_DIR!, `${name}.gate`);
}

async function workerReady(child: ChildProcess): Promise<void> {
  await waitFor('a worker to start', async () => logs.get(child)!.some((l) => l.includes('ready; waiting for')));
}

/**
 * Starts workers and lets them take jobs only once every one has booted (a worker's start-up — tsx, the
 * database, pg-boss, its compute thread — takes seconds of CPU; counting it against the phase made the second
 * worker of a pair compete with the first while contributing nothing).
 */
async function startWorkers(env: NodeJS.ProcessEnv, names: string[]): Promise<ChildProcess[]> {
  const ws = names.map((name) => startWorker(env, name));
  await Promise.all(ws.map(workerReady));
  for (const name of names) fs.writeFileSync(gateFile(env, name), '');
  await Promise.all(
    ws.map((w) =>
      waitFor('a worker to take jobs', async () => logs.get(w)!.some((l) => l.includes('consuming the job queue'))),
    ),
  );
  for (const name of names) fs.rmSync(gateFile(env, name), { force: true });
  return ws;
}

async function stopChild(child: ChildProcess, signal: NodeJS.Signals = 'SIGTERM'): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return;
  const exited = new Promise((r) => child.once('exit', r));
  child.kill(signal);
  await Promise.race([exited, sleep(70_000)]);
}

/**
 * CPU seconds used so far by each group of processes (Linux /proc): every process under a given child
 * (workers, web processes) by that child's group name, the PostgreSQL server processes as 'postgres',
 * this script as 'check'. Processes that have exited are not counted (the pg backends are pooled).
 */
function cpuByGroup(groups: Map<number, string>): Record<string, number> {
  const out: Record<string, number> = {};
  if (process.platform !== 'linux') return out;
  const tick = 100; // USER_HZ on Linux
  const info = new Map<number, { ppid: number; comm: string; cpu: number }>();
  for (const entry of fs.readdirSync('/proc')) {
    if (!/^\d+$/.test(entry)) continue;
    try {
      const stat = fs.readFileSync(`/proc/${entry}/stat`, 'utf8');
      const close = stat.lastIndexOf(')');
      const comm = stat.slice(stat.indexOf('(') + 1, close);
      const f = stat.slice(close + 2).split(' '); // f[0] is field 3 (state)
      info.set(Number(entry), { ppid: Number(f[1]), comm, cpu: (Number(f[11]) + Number(f[12])) / tick });
    } catch {
      // exited meanwhile
    }
  }
  for (const [pid, p] of info) {
    let group: string | undefined;
    if (p.comm === 'postgres') group = 'postgres';
    else if (pid === process.pid) group = 'check';
    else
      for (let at: number | undefined = pid, hops = 0; at && hops < 12; at = info.get(at)?.ppid, hops++) {
        group = groups.get(at);
        if (group) break;
      }
    if (group) out[group] = (out[group] ?? 0) + p.cpu;
  }
  return out;
}

function cpuSince(before: Record<string, number>, after: Record<string, number>, jobs: number) {
  const perJobMs: Record<string, number> = {};
  for (const k of Object.keys(after)) perJobMs[k] = Number(((1000 * (after[k] - (before[k] ?? 0))) / jobs).toFixed(1));
  return perJobMs;
}

async function main() {
  // Build when there is no build or the sources changed since (the web processes run the built app).
  const newest = (dir: string): number =>
    (fs.readdirSync(path.join(root, dir), { recursive: true }) as string[])
      .filter((f) => /\.(ts|tsx)$/.test(f))
      .reduce((m, f) => Math.max(m, fs.statSync(path.join(root, dir, f)).mtimeMs), 0);
  const buildId = path.join(root, '.next', 'BUILD_ID');
  // next.config.mjs and package.json count too: the --s3 mode's 500s came from a build made before the AWS SDK
  // was kept out of the server bundle (next.config.mjs), which the check did not see as stale.
  const configs = ['next.config.mjs', 'package.json'].map((f) => fs.statSync(path.join(root, f)).mtimeMs);
  // --no-build: use the build as it is (experiments on the worker side only; the web processes then run older code).
  const stale =
    !args.includes('--no-build') &&
    (!fs.existsSync(buildId) ||
      Math.max(newest('lib'), newest('app'), newest('models'), ...configs) > fs.statSync(buildId).mtimeMs);
  if (stale) {
    console.error('scale:check: building the app (npm run build)…');
    const b = spawnSync('npm', ['run', 'build'], { cwd: root, stdio: 'inherit' });
    if (b.status !== 0) throw new Error('npm run build failed');
  }
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'steerwise-scale-'));
  let cluster: PgCluster | undefined;
  let s3: S3Fake | undefined;
  try {
    cluster = await startPgCluster();
    // The S3 fake: every process shares the bucket; the workers get data folders of their own, so the
    // snapshot sets they read come from the bucket (lib/storage/shared.ts), not from the web processes' disk.
    if (useS3) s3 = await startS3Fake({ directory: path.join(dataDir, 's3rver'), bucket: 'steerwise' });
    const s3Port = s3?.port ?? 0;
    const env: NodeJS.ProcessEnv = {
      ...process.env,
      NODE_ENV: 'production',
      DATABASE_URL: cluster.url,
      STEERWISE_DATA_DIR: dataDir,
      NEXTAUTH_SECRET: 'scale-check-secret',
      STEERWISE_JOB_LEASE_MS: '4000',
      STEERWISE_JOB_LOG: '1',
      STEERWISE_MAIL_SINK: 'off',
      STEERWISE_PG_POOL_MAX: '5',
      ...(useS3
        ? {
            STEERWISE_S3_BUCKET: 'steerwise',
            STEERWISE_S3_ENDPOINT: `http://127.0.0.1:${s3Port}`,
            STEERWISE_S3_REGION: 'us-east-1',
            STEERWISE_S3_ACCESS_KEY_ID: 'S3RVER',
            STEERWISE_S3_SECRET_ACCESS_KEY: 'S3RVER',
          }
        : {}),
    };
    runSync(['scripts/migrate.ts'], env);
    runSync(['scripts/seed.ts'], { ...env, NODE_ENV: 'development' });
    const token = runSync(
      ['scripts/token.ts', '--email', 'engineer@steerwise.test', '--name', 'scale check'],
      env,
    ).trim();

    const webs: string[] = [];
    const webChildren: ChildProcess[] = [];
    for (let i = 0; i < 2; i++) {
      const port = await freePort();
      const child = spawnLogged(
        `web${i + 1}`,
        path.join(root, 'node_modules/.bin/next'),
        ['start', '-p', String(port)],
        {
          ...env,
          STEERWISE_RUN_JOBS: '0',
          STEERWISE_WORKERS: '1',
          NEXTAUTH_URL: `http://127.0.0.1:${port}`,
        },
      );
      const base = `http://127.0.0.1:${port}`;
      webs.push(base);
      webChildren.push(child);
      await waitFor(
        `web process ${i + 1}`,
        async () => child.exitCode === null && (await fetch(`${base}/api/health`)).ok,
        180_000,
      );
    }
    const client = new pg.Client({ connectionString: cluster.url });
    client.on('error', (err) => console.error('scale:check: database connection', err.message));
    await client.connect();

    const bodies = Array.from({ length: TOTAL_ESTIMATES }, (_, i) => estimateBody(i));
    const runIds: number[] = [];
    const submit = async (from: number, to: number) => {
      const ids: number[] = [];
      for (let i = from; i < to; i += 8) {
        const batch = await Promise.all(
          bodies.slice(i, Math.min(to, i + 8)).map((b, k) => post(webs[(i + k) % 2], token, '/api/v1/estimates', b)),
        );
        ids.push(...batch);
      }
      runIds.push(...ids);
      return ids;
    };
    const throughput = (rows: JobRow[]) => {
      const start = Math.min(...rows.map((r) => r.startedAt!.getTime()));
      const end = Math.max(...rows.map((r) => r.finishedAt!.getTime()));
      return rows.length / ((end - start) / 1000);
    };
    const uptime = () => os.loadavg().map((v) => Number(v.toFixed(2)));

    // 1 and 2 workers.
    const rates: Record<number, number> = {};
    let from = 0;
    for (const workers of [1, 2]) {
      const ids = await submit(from, from + perPhase);
      from += perPhase;
      const load = uptime();
      const ws = await startWorkers(
        env,
        Array.from({ length: workers }, (_, k) => `worker${k + 1}`),
      );
      const groups = new Map<number, string>([
        ...webChildren.map((c) => [c.pid!, 'web'] as [number, string]),
        ...ws.map((c) => [c.pid!, 'worker'] as [number, string]),
      ]);
      const cpuBefore = cpuByGroup(groups);
      const rows = await waitFor('the estimates', () => allEnded(client, 'estimate', ids), 600_000);
      const cpuPerJobMs = cpuSince(cpuBefore, cpuByGroup(groups), ids.length);
      rates[workers] = throughput(rows);
      console.log(
        JSON.stringify({
          case: 'scale-workers',
          workers,
          jobsPerSecond: Number(rates[workers].toFixed(3)),
          jobs: ids.length,
          threadsPerWorker: 1,
          loadAverage: load,
          // CPU per job by process group over the phase (workers, web processes, PostgreSQL, this script)
          cpuPerJobMs,
        }),
      );
      await Promise.all(ws.map((w) => stopChild(w)));
    }

    const ratioLine = () =>
      console.log(
        JSON.stringify({
          case: 'scale-ratio',
          ratio: Number((rates[2] / rates[1]).toFixed(3)),
          goal: 1.7,
          cores: os.availableParallelism(),
        }),
      );
    // --throughput-only: the two throughput phases without the kill test (experiments).
    if (args.includes('--throughput-only')) {
      ratioLine();
      await client.end();
      return;
    }

    // Kill test: the rest of the estimates and the studies, one of two workers killed mid-way.
    const killIds = await submit(from, TOTAL_ESTIMATES);
    const studyIds: number[] = [];
    for (let i = 0; i < STUDIES; i++) studyIds.push(await post(webs[i % 2], token, '/api/v1/studies', studyBody(i)));
    const ws = await startWorkers(env, ['worker-a', 'worker-b']);
    await waitFor(
      'a quarter of the kill batch',
      async () =>
        (await jobsFor(client, 'estimate', killIds)).filter((r) => !['queued', 'running'].includes(r.status)).length >=
        killIds.length / 4,
      600_000,
    );
    await waitFor(
      'the worker to be killed to hold a job',
      async () =>
        Number(
          (
            await client.query<{ n: string }>(
              `SELECT count(*) AS n FROM jobs WHERE status = 'running' AND "leaseOwner" LIKE $1`,
              [`%/${ws[1].pid}/%`],
            )
          ).rows[0].n,
        ) > 0,
      60_000,
    );
    const heldByVictim = (
      await client.query<{ n: string }>(
        `SELECT count(*) AS n FROM jobs WHERE status = 'running' AND "leaseOwner" LIKE $1`,
        [`%/${ws[1].pid}/%`],
      )
    ).rows[0].n;
    ws[1].kill('SIGKILL');
    const estRows = await waitFor('every estimate', () => allEnded(client, 'estimate', runIds), 900_000);
    const studyRows = await waitFor('every study', () => allEnded(client, 'study', studyIds), 900_000);
    await stopChild(ws[0]);

    // Exactly once: one stored result per job, across every worker's log.
    const stored = new Map<number, number>();
    for (const lines of logs.values())
      for (const l of lines) {
        const m = /job-stored (\{.*\})/.exec(l);
        if (m) {
          const { jobId } = JSON.parse(m[1]) as { jobId: number };
          stored.set(jobId, (stored.get(jobId) ?? 0) + 1);
        }
      }
    const allRows = [...estRows, ...studyRows];
    const lost = allRows.filter((r) => r.status !== 'done' || !stored.has(r.id)).length;
    const duplicated = allRows.filter((r) => (stored.get(r.id) ?? 0) > 1).length;
    const rerun = allRows.filter((r) => r.attempts > 1).length;

    // Bearings equal to the single-process mode's: the same compute in this process on the stored inputs.
    const { compute } = await import('../lib/jobs/compute');
    let mismatched = 0;
    let compared = 0;
    const { rows: runs } = await client.query<{ id: number; inputs: Record<string, unknown>; result: unknown }>(
      `SELECT id, inputs, result FROM estimate_runs WHERE id = ANY($1) ORDER BY id`,
      [runIds],
    );
    for (const run of runs) {
      const i = runIds.indexOf(run.id);
      const body = JSON.parse(bodies[i]) as { snapshots: { re: number[][]; im: number[][] } };
      const re = Float64Array.from(body.snapshots.re.flat());
      const im = Float64Array.from(body.snapshots.im.flat());
      const inputs = run.inputs as {
        methods: never;
        options: never;
        array: { elements: number; spacingWavelengths: number };
      };
      const expected = await compute(
        'estimate',
        {
          source: { kind: 'matrix', rows: N, cols: M, re, im },
          elements: inputs.array.elements,
          spacingWavelengths: inputs.array.spacingWavelengths,
          methods: inputs.methods,
          options: inputs.options,
        },
        () => undefined,
      );
      const got = (run.result as { results?: { method: string; bearingsDeg: number[] }[] } | null)?.results ?? [];
      compared++;
      const same =
        got.length === expected.results.length &&
        expected.results.every(
          (e, k) =>
            got[k].method === e.method &&
            got[k].bearingsDeg.length === e.bearingsDeg.length &&
            e.bearingsDeg.every((b, j) => Object.is(b, got[k].bearingsDeg[j])),
        );
      if (!same) mismatched++;
    }
    const { rows: studies } = await client.query<{ id: number; inputs: { spec: unknown }; result: unknown }>(
      `SELECT id, inputs, result FROM studies WHERE id = ANY($1)`,
      [studyIds],
    );
    for (const s of studies) {
      const expected = await compute('study', s.inputs.spec as never, () => undefined);
      compared++;
      // Keys sorted (JSONB keeps its own key order), timings left out.
      const strip = (v: unknown): string =>
        JSON.stringify(v, (k, x) =>
          /elapsed|Ms$/i.test(k)
            ? undefined
            : x && typeof x === 'object' && !Array.isArray(x)
              ? Object.fromEntries(Object.entries(x as object).sort(([a], [b]) => (a < b ? -1 : 1)))
              : x,
        );
      if (strip(expected) !== strip(s.result)) mismatched++;
    }
    await client.end();
    // Snapshot sets the workers fetched from the bucket into their own data folders.
    const fromS3 = fs
      .readdirSync(dataDir)
      .filter((d) => d.startsWith('worker'))
      .reduce(
        (n, d) =>
          n +
          (fs.readdirSync(path.join(dataDir, d), { recursive: true }) as string[]).filter((f) => f.endsWith('.c128'))
            .length,
        0,
      );
    console.log(
      JSON.stringify({
        case: 'scale-kill',
        snapshotSetsFetchedFromS3: fromS3,
        lost,
        duplicated,
        estimates: estRows.length,
        studies: studyRows.length,
        heldByKilledWorker: Number(heldByVictim),
        reRun: rerun,
        comparedWithSingleProcess: compared,
        mismatched,
      }),
    );
    ratioLine();
    if (lost || duplicated || mismatched) process.exitCode = 1;
  } catch (err) {
    console.error('scale:check failed:', err);
    for (const [child, lines] of logs) console.error(`--- pid ${child.pid}\n${lines.slice(-15).join('\n')}`);
    process.exitCode = 1;
  } finally {
    for (const c of children) await stopChild(c, 'SIGTERM').catch(() => undefined);
    await cluster?.stop();
    await s3?.close().catch(() => undefined);
    fs.rmSync(dataDir, { recursive: true, force: true });
  }
}

main().catch((err) => {
  console.error(err);
  for (const c of children) c.kill('SIGKILL');
  process.exit(1);
});
