/**
 * Upload-route benchmark (issue 5: parse throughput and peak memory for a
 * 100 MB CSV through the upload route, not the parser alone), plus the time
 * per method of an estimate run (how long the job holds the event loop).
 *
 *   npx tsx scripts/bench-upload.ts [MB] [elements]
 *
 * Uses a temporary data folder and database (migrated and seeded), writes a
 * seeded complex CSV, streams it as a multipart body into the real
 * POST /api/v1/datasets handler with a bearer token, and reports wall time,
 * MB/s, and the RSS / ArrayBuffer high-water marks sampled every 20 ms.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Readable } from 'node:stream';
import Module from 'node:module';
import { SeededRandom } from '../lib/doa/sim/simulate';

// `server-only` throws outside Next's server build; here the route runs in plain Node.
const resolver = Module as unknown as { _resolveFilename: (request: string, ...rest: unknown[]) => string };
const original = resolver._resolveFilename;
resolver._resolveFilename = (request, ...rest) =>
  original(request === 'server-only' ? path.resolve('node_modules/server-only/empty.js') : request, ...rest);

const MB = 1e6;
const targetMb = Number(process.argv[2] ?? 100);
const elements = Number(process.argv[3] ?? 8);
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'steerwise-bench-upload-'));
process.env.STEERWISE_DATA_DIR = dir;
process.env.STEERWISE_DB = path.join(dir, 'bench.sqlite');
process.env.NEXTAUTH_SECRET = 'bench';
process.env.STEERWISE_MAX_UPLOAD_BYTES = String(1024 * 1024 * 1024);

/** Uniform on (−1, 1) from the engine's seeded generator. */
function rng(seed: number) {
  const random = new SeededRandom(seed);
  return () => 2 * random.next() - 1;
}

async function main() {
  const { getDb } = await import('../lib/db');
  const { migrateUp } = await import('../lib/db/migrate');
  const { seedDemo } = await import('../lib/demo/seed');
  const { ApiToken, User } = await import('../models');
  const { sha256Hex } = await import('../lib/auth/secrets');
  const db = await getDb();
  await migrateUp(db);
  await seedDemo(db);
  const engineer = (await User.findOne({ where: { email: 'engineer@steerwise.test' } }))!;
  await ApiToken.create({
    userId: engineer.id,
    name: 'bench',
    tokenHash: sha256Hex('bench-token'),
    prefix: 'bench',
  } as never);

  const csv = path.join(dir, 'big.csv');
  const out = fs.createWriteStream(csv);
  const rand = rng(12345);
  let bytes = 0;
  while (bytes < targetMb * MB) {
    const lines: string[] = [];
    for (let i = 0; i < 2000; i++) {
      const f: string[] = [];
      for (let m = 0; m < elements; m++) {
        const re = rand();
        const im = rand();
        f.push(`${re.toPrecision(17)}${im < 0 ? '' : '+'}${im.toPrecision(17)}j`);
      }
      lines.push(f.join(','));
    }
    const chunk = lines.join('\n') + '\n';
    bytes += chunk.length;
    if (!out.write(chunk)) await new Promise<void>((r) => out.once('drain', () => r()));
  }
  await new Promise<void>((r) => out.end(() => r()));
  const size = fs.statSync(csv).size;

  const { POST } = await import('../app/api/v1/datasets/route');
  const boundary = 'benchboundary';
  const head = Buffer.from(
    `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="big.csv"\r\nContent-Type: text/csv\r\n\r\n`,
  );
  const tail = Buffer.from(`\r\n--${boundary}--\r\n`);
  async function* body() {
    yield head;
    for await (const piece of fs.createReadStream(csv, { highWaterMark: 256 * 1024 })) yield piece as Buffer;
    yield tail;
  }
  const stream = Readable.toWeb(Readable.from(body())) as ReadableStream<Uint8Array>;
  global.gc?.();
  const base = process.memoryUsage();
  let peakRss = base.rss;
  let peakBuffers = base.arrayBuffers;
  const timer = setInterval(() => {
    const m = process.memoryUsage();
    peakRss = Math.max(peakRss, m.rss);
    peakBuffers = Math.max(peakBuffers, m.arrayBuffers);
  }, 20);
  const t0 = performance.now();
  const cpu0 = process.cpuUsage();
  const res = await POST(
    new Request('http://localhost/api/v1/datasets', {
      method: 'POST',
      body: stream,
      duplex: 'half',
      headers: { authorization: 'Bearer bench-token', 'content-type': `multipart/form-data; boundary=${boundary}` },
    } as RequestInit),
    { params: Promise.resolve({}) },
  );
  const seconds = (performance.now() - t0) / 1000;
  const cpu = process.cpuUsage(cpu0);
  clearInterval(timer);
  const answer = await res.json();
  console.log(`upload route: ${res.status} ${JSON.stringify(answer).slice(0, 160)}`);
  console.log(
    `file ${(size / MB).toFixed(1)} MB, ${elements} elements: ${seconds.toFixed(2)} s wall (${(size / MB / seconds).toFixed(1)} MB/s), CPU ${((cpu.user + cpu.system) / 1e6).toFixed(2)} s (${(size / MB / ((cpu.user + cpu.system) / 1e6)).toFixed(1)} MB/s of CPU)`,
  );
  console.log(
    `memory: RSS before ${(base.rss / MB).toFixed(0)} MB, peak ${(peakRss / MB).toFixed(0)} MB; ArrayBuffers peak ${(peakBuffers / MB).toFixed(0)} MB; maxRSS ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB`,
  );

  // Time per method of a run on the demo harbour line (16 × 400): how long each step holds the event loop.
  const { runMethod, usedCovariance } = await import('../lib/jobs/estimate-run');
  const { simulateSnapshots, DOA_METHODS } = await import('../lib/doa');
  const x = simulateSnapshots({
    elements: 16,
    spacingWavelengths: 0.5,
    bearingsDeg: [-23, 31.5],
    powers: [1, 2.5],
    noisePower: 0.5,
    snapshots: 400,
    seed: 4101,
  });
  const rows = { rows: 400, cols: 16, re: new Float64Array(400 * 16), im: new Float64Array(400 * 16) };
  for (let n = 0; n < 400; n++)
    for (let m = 0; m < 16; m++) {
      rows.re[n * 16 + m] = x.re[m * 400 + n];
      rows.im[n * 16 + m] = x.im[m * 400 + n];
    }
  const cov = usedCovariance(rows, {});
  for (const method of DOA_METHODS) {
    runMethod({
      rows,
      elements: 16,
      spacingWavelengths: 0.5,
      method,
      options: { includeSpectrum: true },
      covariance: cov,
    }); // warm-up
    const times: number[] = [];
    for (let i = 0; i < 5; i++) {
      const t = performance.now();
      runMethod({
        rows,
        elements: 16,
        spacingWavelengths: 0.5,
        method,
        options: { includeSpectrum: true },
        covariance: cov,
      });
      times.push(performance.now() - t);
    }
    times.sort((a, b) => a - b);
    console.log(
      `run step ${method.padEnd(15)} median ${times[2].toFixed(1)} ms (min ${times[0].toFixed(1)}, max ${times[4].toFixed(1)}), 16 elements × 400 snapshots, with spectrum`,
    );
  }
  const { closeDb } = await import('../lib/db');
  await closeDb();
  fs.rmSync(dir, { recursive: true, force: true });
}

main().catch((err) => {
  console.error(err);
  fs.rmSync(dir, { recursive: true, force: true });
  process.exit(1);
});
