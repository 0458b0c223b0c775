/**
 * npm run worker: a compute worker process for a larger team (README, "Running
 * for a larger team"). It opens the database at DATABASE_URL, consumes the
 * shared pg-boss job queue with STEERWISE_WORKERS compute threads (one job per
 * thread), renews the leases of its jobs, and re-queues the jobs of workers
 * that died (lease sweep). Run as many as you like, on any machine that
 * reaches the database and the file store. SIGTERM/SIGINT stop it after the
 * running jobs end (a SIGKILL loses nothing: another worker re-runs them).
 */
import { createRequire } from 'node:module';

// The data modules import 'server-only', which throws outside Next's server build; stand in an empty module.
const require_ = createRequire(import.meta.url);
const serverOnly = require_.resolve('server-only');
require_.cache[serverOnly] = { id: serverOnly, filename: serverOnly, loaded: true, exports: {} } as NodeJS.Module;

async function main() {
  const { databaseUrl } = await import('../lib/env');
  const { queueBackend } = await import('../lib/jobs/queue');
  if (!databaseUrl() || queueBackend() !== 'pg-boss') {
    console.error(
      'npm run worker consumes the shared queue on Postgres: set DATABASE_URL=postgres://… (with SQLite the web process runs its jobs itself).',
    );
    process.exit(2);
  }
  const { getDb, closeDb } = await import('../lib/db');
  const { startJobRunner, stopJobRunner, recoverStaleJobs } = await import('../lib/jobs');
  const { closePool, poolSize, warmPool } = await import('../lib/jobs/pool');
  // Importing the data modules registers their job kinds.
  await import('../lib/data/estimates');
  await import('../lib/data/studies');
  await import('../lib/data/datasets');
  await import('../lib/data/calibrations');
  await import('../lib/data/bearing-time-records');
  await getDb();
  // Start the compute threads and load the compute bundle now, not with the first job.
  const { runCompute } = await import('../lib/jobs/pool');
  const tiny = Float64Array.from({ length: 8 }, (_, i) => Math.cos(i));
  await runCompute('estimate', {
    source: { kind: 'matrix', rows: 4, cols: 2, re: tiny, im: tiny.map(Math.sin) },
    elements: 2,
    spacingWavelengths: 0.5,
    methods: ['esprit-ls'],
    options: { sourceCount: 1 },
  } as never);
  // STEERWISE_WORKER_GATE=<file> (benchmarks: scale:check): everything is loaded, then the worker waits until that
  // file exists before it takes jobs, so a measured phase starts with every worker ready rather than one still booting.
  const gate = process.env.STEERWISE_WORKER_GATE;
  if (gate) {
    console.log(`[steerwise] worker ${process.pid} ready; waiting for ${gate}`);
    const fs = await import('node:fs');
    while (!fs.existsSync(gate)) await new Promise((r) => setTimeout(r, 50));
  }
  await recoverStaleJobs();
  startJobRunner();
  warmPool();
  console.log(`[steerwise] worker ${process.pid} consuming the job queue with ${poolSize()} compute thread(s)`);
  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    console.log(`[steerwise] worker ${process.pid} stopping (${signal}); waiting for running jobs`);
    await stopJobRunner(60_000);
    await closePool();
    await closeDb();
    process.exit(0);
  };
  process.on('SIGTERM', () => void stop('SIGTERM'));
  process.on('SIGINT', () => void stop('SIGINT'));
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
