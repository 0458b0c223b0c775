/**
 * Throughput benchmark of the CSV snapshot reader (issue 5 asks for MB/s and
 * peak memory on a 100 MB CSV).
 *
 *   npm run bench:datasets            # ~100 MB, 8 elements, complex a+bj values
 *   npm run bench:datasets -- 250 16  # size in MB, elements
 *
 * Writes a seeded complex CSV to a temporary directory (streamed, so writing
 * it costs little memory), parses it with parseSnapshotFile, and prints the
 * parse rate and the memory high-water marks seen while parsing: RSS, V8 heap
 * and ArrayBuffer memory (where the Float64Array outputs live), sampled every
 * 20 ms and at each progress report, plus the process maxRSS from getrusage.
 * CPU time is printed too, since wall time on a shared machine varies with load.
 * Also times the streaming SHA-256 of the same file. The file is deleted after.
 */
import { createWriteStream, promises as fsp } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { once } from 'node:events';
import { parseSnapshotFile, sha256File } from '../lib/datasets';
import { SeededRandom } from '../lib/doa/sim/simulate';

const MB = 1e6;

async function writeCsv(file: string, targetBytes: number, elements: number): Promise<{ rows: number; bytes: number }> {
  const out = createWriteStream(file);
  const random = new SeededRandom(12345);
  const rand = () => 2 * random.next() - 1; // uniform in (−1, 1)
  out.write(Array.from({ length: elements }, (_, m) => `element${m}`).join(',') + '\n');
  let bytes = 0;
  let rows = 0;
  let block: string[] = [];
  let blockBytes = 0;
  while (bytes < targetBytes) {
    const fields: string[] = [];
    for (let m = 0; m < elements; m++) {
      const re = rand() * 10 ** Math.floor(rand() * 4);
      const im = rand();
      fields.push(`${re.toPrecision(17)}${im < 0 ? '' : '+'}${im.toPrecision(17)}j`);
    }
    const line = fields.join(',') + '\n';
    block.push(line);
    blockBytes += line.length;
    bytes += line.length;
    rows++;
    if (blockBytes > 1 << 20) {
      if (!out.write(block.join(''))) await once(out, 'drain');
      block = [];
      blockBytes = 0;
    }
  }
  out.write(block.join(''));
  out.end();
  await once(out, 'finish');
  return { rows, bytes };
}

async function main(): Promise<void> {
  const sizeMb = Number(process.argv[2] ?? 100);
  const elements = Number(process.argv[3] ?? 8);
  const dir = await fsp.mkdtemp(path.join(os.tmpdir(), 'steerwise-bench-'));
  const file = path.join(dir, 'bench.csv');
  try {
    process.stdout.write(`writing a ${sizeMb} MB complex CSV with ${elements} elements per row … `);
    const { rows } = await writeCsv(file, sizeMb * MB, elements);
    const size = (await fsp.stat(file)).size;
    console.log(`${(size / MB).toFixed(1)} MB, ${rows} snapshot rows`);

    if (global.gc) global.gc();
    const base = process.memoryUsage();
    const peak = { rss: base.rss, heapUsed: base.heapUsed, arrayBuffers: base.arrayBuffers };
    const sample = () => {
      const m = process.memoryUsage();
      peak.rss = Math.max(peak.rss, m.rss);
      peak.heapUsed = Math.max(peak.heapUsed, m.heapUsed);
      peak.arrayBuffers = Math.max(peak.arrayBuffers, m.arrayBuffers);
    };
    const timer = setInterval(sample, 20);
    const cpu0 = process.cpuUsage();
    const t0 = process.hrtime.bigint();
    const parsed = await parseSnapshotFile({
      path: file,
      maxBytes: Math.max(size + 1, 200 * 1024 * 1024),
      maxValues: 2 ** 28,
      onProgress: sample,
    });
    const seconds = Number(process.hrtime.bigint() - t0) / 1e9;
    const cpu = process.cpuUsage(cpu0);
    const cpuSeconds = (cpu.user + cpu.system) / 1e6;
    sample();
    clearInterval(timer);

    const t1 = process.hrtime.bigint();
    const digest = await sha256File(file);
    const hashSeconds = Number(process.hrtime.bigint() - t1) / 1e9;

    const outputMb = (parsed.re.byteLength + parsed.im.byteLength) / MB;
    const mib = (n: number) => `${(n / 1024 / 1024).toFixed(0)} MiB`;
    console.log(
      `parsed ${parsed.snapshots} × ${parsed.elements} in ${seconds.toFixed(2)} s: ${(size / MB / seconds).toFixed(1)} MB/s`,
    );
    console.log(
      `CPU time ${cpuSeconds.toFixed(2)} s: ${(size / MB / cpuSeconds).toFixed(1)} MB per CPU-second (less sensitive to a busy machine; includes GC threads)`,
    );
    console.log(`output arrays (re + im): ${outputMb.toFixed(1)} MB`);
    console.log(
      `memory before parse: rss ${mib(base.rss)}, heap ${mib(base.heapUsed)}, arrayBuffers ${mib(base.arrayBuffers)}`,
    );
    console.log(
      `peak during parse:   rss ${mib(peak.rss)}, heap ${mib(peak.heapUsed)}, arrayBuffers ${mib(peak.arrayBuffers)}`,
    );
    console.log(`process maxRSS (getrusage, whole run): ${mib(process.resourceUsage().maxRSS * 1024)}`);
    console.log(
      `sha256 ${digest.slice(0, 16)}… in ${hashSeconds.toFixed(2)} s: ${(size / MB / hashSeconds).toFixed(0)} MB/s`,
    );
  } finally {
    await fsp.rm(dir, { recursive: true, force: true });
  }
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
