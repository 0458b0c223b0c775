/**
 * Where the time of one inline estimate request goes (POST /api/v1/estimates,
 * M = 16, N = 1000, two sources, LS-ESPRIT, no spectrum), measured in-process
 * on a temporary migrated and seeded database:
 *
 *   npx tsx scripts/bench-request.ts [--json] [--n 40] [--keep]
 *
 * Phases (median over the runs after a warm-up): JSON.parse of the body, zod
 * validation, both together in a worker thread as the route does it (parseInWorker, the web
 * thread only waits), storing the snapshot set (SHA-256 + file), the whole
 * submitEstimate (an inline run the client waits for: compute in the worker, then run, done
 * job and audit event in one transaction), the compute alone in the worker (runCompute), and shaping the
 * answer (JSON.stringify of the §7 body). Then 200 more runs of the same body give the
 * database growth per run (`dbBytesPerRun`, the snapshot set being stored already) and
 * its split over tables and indexes (`bytesPerRunByObject`, SQLite's dbstat view). `--keep`
 * leaves the temporary data folder in place to look at the rows.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';

// The data modules import 'server-only', which throws outside Next's server build; stand in an empty module.
const serverOnly = require.resolve('server-only');
require.cache[serverOnly] = { id: serverOnly, filename: serverOnly, loaded: true, exports: {} } as NodeJS.Module;

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'steerwise-req-'));
process.env.STEERWISE_DATA_DIR = dir;
process.env.STEERWISE_DB = path.join(dir, 'db.sqlite');
process.env.NEXTAUTH_SECRET = 'bench-request';

const args = process.argv.slice(2);
const runs = args.includes('--n') ? Number(args[args.indexOf('--n') + 1]) : 40;

async function main() {
  const { getDb } = await import('../lib/db');
  const { migrateUp } = await import('../lib/db/migrate');
  const { seedDemo } = await import('../lib/demo/seed');
  const { inlineEstimateBody } = await import('./inline-estimate-body');
  const { estimateRequestSchema } = await import('../lib/validations/estimate');
  const { parseEstimateBody, submitEstimate, v1Answer } = await import('../lib/data/estimates');
  const { storeSnapshotSet } = await import('../lib/storage/snapshots');
  const { runCompute, closePool } = await import('../lib/jobs/pool');
  const { stopJobRunner } = await import('../lib/jobs');
  const { User } = await import('../models');
  const db = await getDb();
  await migrateUp(db);
  await seedDemo(db);
  const user = (await User.findOne({ where: { email: 'engineer@steerwise.test' } }))!;
  const caller = {
    id: user.id,
    email: user.email,
    name: user.name,
    role: user.role,
    teamId: user.teamId as number,
    via: 'token' as const,
  };
  const text = inlineEstimateBody();
  const { re, im } = (JSON.parse(text) as { snapshots: { re: number[][]; im: number[][] } }).snapshots;
  const n = re.length;
  const m = re[0].length;
  const t: Record<string, number[]> = {
    parse: [],
    validate: [],
    parseInWorker: [],
    storeSnapshots: [],
    submitEstimate: [],
    computeInWorker: [],
    answer: [],
  };
  const time = async <T>(k: string, fn: () => T | Promise<T>): Promise<T> => {
    const t0 = performance.now();
    const v = await fn();
    t[k].push(performance.now() - t0);
    return v;
  };
  for (let i = 0; i < runs + 5; i++) {
    const body = await time('parse', () => JSON.parse(text));
    const input = await time('validate', () => estimateRequestSchema.parse(body));
    // What the route does instead: parse, validate and flatten in a worker thread.
    await time('parseInWorker', () => parseEstimateBody(Buffer.from(text)));
    const flat = { rows: n, cols: m, re: new Float64Array(re.flat()), im: new Float64Array(im.flat()) };
    await time('storeSnapshots', () => storeSnapshotSet(flat));
    const run = await time('submitEstimate', () => submitEstimate({ caller, input, wait: true }));
    await time('computeInWorker', () =>
      runCompute('estimate', {
        source: { kind: 'matrix', ...flat },
        elements: m,
        spacingWavelengths: 0.5,
        methods: ['esprit-ls'],
        options: { sourceCount: 2, includeSpectrum: false },
      }),
    );
    await time('answer', () => JSON.stringify(v1Answer(run)));
    if (i < 5) for (const k of Object.keys(t)) t[k].length = 0;
  }
  // Database bytes per inline run of the same snapshot set (main file + WAL after a TRUNCATE checkpoint).
  const dbSize = async () => {
    await db.query('PRAGMA wal_checkpoint(TRUNCATE)');
    const size = (f: string) => (fs.existsSync(f) ? fs.statSync(f).size : 0);
    return size(process.env.STEERWISE_DB!) + size(`${process.env.STEERWISE_DB}-wal`);
  };
  const input = estimateRequestSchema.parse(JSON.parse(text));
  const sizeBefore = await dbSize();
  const before = await bytesByObject(db).catch(() => null);
  const growthRuns = 200;
  for (let i = 0; i < growthRuns; i++) await submitEstimate({ caller, input, wait: true });
  const dbBytesPerRun = Math.round(((await dbSize()) - sizeBefore) / growthRuns);
  // Where those bytes are: the JSON columns of the last run, its job and its audit event (characters).
  const [[sizes]] = (await db.query(
    `SELECT length(r.inputs) AS inputs, length(r.result) AS result,
       (SELECT length(detail) + length(action) + length(coalesce(target, '')) FROM audit_events ORDER BY id DESC LIMIT 1) AS audit
     FROM estimate_runs r ORDER BY r.id DESC LIMIT 1`,
  )) as [Record<string, number>[], unknown];
  // Where the growth is, by table and index (SQLite's dbstat view, when compiled in): bytes per run.
  const perObject = await bytesByObject(db).catch(() => null);
  const byObject =
    perObject && before
      ? Object.fromEntries(
          Object.entries(perObject)
            .map(([k, v]) => [k, Math.round((v - (before[k] ?? 0)) / growthRuns)] as const)
            .filter(([, v]) => v > 0),
        )
      : null;
  const median = (a: number[]) => [...a].sort((p, q) => p - q)[Math.floor(a.length / 2)];
  const out = Object.fromEntries(Object.entries(t).map(([k, v]) => [`${k}Ms`, Math.round(median(v) * 100) / 100]));
  console.log(
    args.includes('--json')
      ? JSON.stringify({
          case: 'request-phases',
          runs,
          bodyMb: Math.round(text.length / 1e4) / 100,
          ...out,
          dbBytesPerRun,
          lastRunChars: sizes,
          ...(byObject ? { bytesPerRunByObject: byObject } : {}),
        })
      : { ...out, dbBytesPerRun, lastRunChars: sizes, bytesPerRunByObject: byObject },
  );
  await stopJobRunner();
  await closePool();
  if (args.includes('--keep')) console.error(`kept ${dir}`);
  else fs.rmSync(dir, { recursive: true, force: true });
  process.exit(0);
}

async function bytesByObject(db: import('sequelize').Sequelize): Promise<Record<string, number>> {
  const [rows] = (await db.query('SELECT name, SUM(pgsize) AS bytes FROM dbstat GROUP BY name')) as [
    { name: string; bytes: number }[],
    unknown,
  ];
  return Object.fromEntries(rows.map((r) => [r.name, Number(r.bytes)]));
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
