/**
 * Benchmark of the bearing–time record (lib/doa/wideband).
 *
 *   npm run bench:btr            human-readable summary
 *   npm run bench:btr -- --json  one JSON line: {"case": "btr-16ch-16k-300s", ...}
 *   --seconds N                  recording length (default 300)
 *   --keep PATH                  write the recording to PATH and keep it (reused if it exists)
 *   --workers N                  split the blocks over N worker threads (default 1); CPU time
 *                                then counts every thread of the process
 *
 * Case: a 5-minute, 16-channel, 16 kHz, 16-bit PCM WAV (about 147 MiB), written
 * to a temporary file by a child process with the broadband simulator (two
 * invented moving contacts and white noise), then read back here through the
 * streaming WAV source: 1 s blocks, 50 % overlap, 1024-point FFT (hop 512, so
 * 30 frames per block; Hann), 1–4 kHz band, wideband MUSIC, K = 2 given, per-bin MUSIC bearings,
 * tracks. Reported: wall time of the record (file reading included), the
 * real-time factor, the CPU time of this process (less sensitive to other load), its peak RSS (the child that wrote the file is a
 * separate process) and the load average, since the machine is shared.
 * Goal (issue 14): ≥ 20× real time, RSS ≤ 800 MB.
 */
import { spawnSync } from 'node:child_process';
import { Worker, isMainThread, parentPort, workerData } from 'node:worker_threads';
import { closeSync, existsSync, mkdtempSync, openSync, rmSync, writeSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { openTimeSeries } from '../lib/datasets/time-series';
import {
  bearingTimeRecord,
  blockCount,
  BroadbandSimulator,
  joinBlockRanges,
  planWideband,
  type BearingTimeBlock,
  type WidebandOptions,
} from '../lib/doa/wideband';

const FS = 16000;
const M = 16;
const C = 1500;
const SPACING_M = C / (2 * 4000); // half a wavelength at 4 kHz

const OPTIONS: WidebandOptions = {
  elements: M,
  spacingM: SPACING_M,
  propagationSpeedMps: C,
  band: { lowHz: 1000, highHz: 4000 },
  blockSeconds: 1,
  blockOverlap: 0.5,
  fftLength: 1024,
  hop: 512,
  window: 'hann',
  method: 'music',
  sourceCount: 2,
};

/** Worker body: one block range of the file; posts the blocks back. */
async function workerMain(): Promise<void> {
  const { file, first, count } = workerData as { file: string; first: number; count: number };
  const source = await openTimeSeries({ path: file, maxBytes: 1024 * 1024 * 1024 });
  const rec = await bearingTimeRecord(source, OPTIONS, { blockRange: { first, count }, yieldEvery: 0 });
  parentPort!.postMessage({ blocks: rec.blocks, levelsDb: rec.image.levelsDb });
}

/**
 * Splits the blocks over `workers` threads of this process and joins the shares with
 * joinBlockRanges (blocks in order, tracks over the whole record with the record's merge
 * distance), as the service job does; so the record equals the single-threaded one.
 */
async function recordWithWorkers(
  file: string,
  workers: number,
): Promise<{ blocks: number; bins: number; frames: number; tracks: number }> {
  const probe = await openTimeSeries({ path: file, maxBytes: 1024 * 1024 * 1024 });
  const plan = planWideband(OPTIONS, probe);
  const total = blockCount(plan, probe.samplesPerChannel);
  await probe.close();
  const parts: Promise<{ blocks: BearingTimeBlock[]; levelsDb: Float32Array }>[] = [];
  for (let w = 0; w < workers; w++) {
    const first = Math.round((w * total) / workers);
    const count = Math.round(((w + 1) * total) / workers) - first;
    parts.push(
      new Promise((resolve, reject) => {
        // The worker loads this TypeScript file through tsx's CommonJS hook.
        const boot = `require('tsx/cjs'); require(${JSON.stringify(__filename)});`;
        const worker = new Worker(boot, { eval: true, workerData: { file, first, count } });
        worker.once('message', (m: { blocks: BearingTimeBlock[]; levelsDb: Float32Array }) => resolve(m));
        worker.once('error', reject);
      }),
    );
  }
  const { blocks, tracks } = joinBlockRanges(await Promise.all(parts), plan);
  return { blocks: blocks.length, bins: plan.bins.length, frames: plan.framesPerBlock, tracks: tracks.length };
}

function arg(name: string): string | undefined {
  const i = process.argv.indexOf(name);
  return i >= 0 ? process.argv[i + 1] : undefined;
}

function writeRecording(file: string, seconds: number): void {
  const sim = new BroadbandSimulator({
    elements: M,
    spacingM: SPACING_M,
    propagationSpeedMps: C,
    sampleRate: FS,
    durationS: seconds,
    sources: [
      {
        trajectory: [
          { tS: 0, bearingDeg: -40 },
          { tS: seconds, bearingDeg: 35 },
        ],
        rms: 0.05,
        bandHz: [800, 4500],
      },
      {
        trajectory: [
          { tS: 0, bearingDeg: 20 },
          { tS: seconds, bearingDeg: 5 },
        ],
        rms: 0.03,
        bandHz: [800, 4500],
      },
    ],
    noiseRms: 0.05,
    seed: 1414,
    interpolationHalfLength: 8,
    firTaps: 63,
  });
  const total = sim.samplesPerChannel;
  const dataBytes = total * M * 2;
  const header = Buffer.alloc(44);
  header.write('RIFF', 0, 'latin1');
  header.writeUInt32LE(36 + dataBytes, 4);
  header.write('WAVEfmt ', 8, 'latin1');
  header.writeUInt32LE(16, 16);
  header.writeUInt16LE(1, 20);
  header.writeUInt16LE(M, 22);
  header.writeUInt32LE(FS, 24);
  header.writeUInt32LE(FS * M * 2, 28);
  header.writeUInt16LE(M * 2, 32);
  header.writeUInt16LE(16, 34);
  header.write('data', 36, 'latin1');
  header.writeUInt32LE(dataBytes, 40);
  const fd = openSync(file, 'w');
  writeSync(fd, header);
  const out = Array.from({ length: M }, () => new Float32Array(FS));
  const buf = Buffer.alloc(FS * M * 2);
  for (let s = 0; s < total; s += FS) {
    const n = Math.min(FS, total - s);
    sim.render(s, n, out);
    for (let i = 0; i < n; i++) {
      for (let c = 0; c < M; c++) {
        const v = Math.max(-32768, Math.min(32767, Math.round(out[c][i] * 32768)));
        buf.writeInt16LE(v, (i * M + c) * 2);
      }
    }
    writeSync(fd, buf, 0, n * M * 2);
  }
  closeSync(fd);
}

async function main(): Promise<void> {
  const seconds = Number(arg('--seconds') ?? 300);
  const writeTo = arg('--write');
  if (writeTo) {
    writeRecording(writeTo, seconds);
    return;
  }
  const json = process.argv.includes('--json');
  const workers = Number(arg('--workers') ?? 1);
  const keep = arg('--keep');
  const dir = keep ? null : mkdtempSync(path.join(os.tmpdir(), 'bench-btr-'));
  const file = keep ?? path.join(dir!, 'recording.wav');
  try {
    const g0 = performance.now();
    if (!(keep && existsSync(keep))) {
      const child = spawnSync(
        process.execPath,
        [...process.execArgv, __filename, '--write', file, '--seconds', String(seconds)],
        {
          stdio: ['ignore', 'inherit', 'inherit'],
        },
      );
      if (child.status !== 0) throw new Error(`writing the recording failed (${child.status ?? child.signal})`);
    }
    const generateS = (performance.now() - g0) / 1000;
    const loadBefore = os.loadavg()[0];
    const rssBefore = process.memoryUsage().rss;
    const t0 = performance.now();
    const cpu0 = process.cpuUsage();
    let summary: { blocks: number; bins: number; frames: number; tracks: number };
    if (workers > 1) summary = await recordWithWorkers(file, workers);
    else {
      const record = await bearingTimeRecord(
        await openTimeSeries({ path: file, maxBytes: 1024 * 1024 * 1024 }),
        OPTIONS,
      );
      summary = {
        blocks: record.blocks.length,
        bins: record.bins.count,
        frames: record.framesPerBlock,
        tracks: record.tracks.length,
      };
    }
    const fileMb = (seconds * FS * M * 2) / 1e6;
    const elapsed = (performance.now() - t0) / 1000;
    const cpu = process.cpuUsage(cpu0);
    const cpuSeconds = (cpu.user + cpu.system) / 1e6;
    const row = {
      case: `btr-${M}ch-${FS / 1000}k-${seconds}s${workers > 1 ? `-${workers}workers` : ''}`,
      seconds: Number(elapsed.toFixed(2)),
      realTimeFactor: Number((seconds / elapsed).toFixed(1)),
      cpuSeconds: Number(cpuSeconds.toFixed(2)),
      cpuRealTimeFactor: Number((seconds / cpuSeconds).toFixed(1)),
      goalRealTimeFactor: 20,
      peakRssMb: Math.round(process.resourceUsage().maxRSS / 1024),
      rssBeforeMb: Math.round(rssBefore / 1e6),
      goalRssMb: 800,
      fileMb: Number(fileMb.toFixed(1)),
      blocks: summary.blocks,
      bins: summary.bins,
      framesPerBlock: summary.frames,
      tracks: summary.tracks,
      loadAverage1m: [Number(loadBefore.toFixed(2)), Number(os.loadavg()[0].toFixed(2))],
      cpus: os.cpus().length,
      generateSeconds: Number(generateS.toFixed(1)),
    };
    if (json) console.log(JSON.stringify(row));
    else {
      console.log(
        `${row.case}: ${row.seconds} s for ${seconds} s of recording (${row.realTimeFactor}× real time; goal ≥ 20×; ` +
          `CPU ${row.cpuSeconds} s, ${row.cpuRealTimeFactor}×), ` +
          `peak RSS ${row.peakRssMb} MB (goal ≤ 800), ${row.blocks} blocks × ${row.bins} bins × ${row.framesPerBlock} frames, ` +
          `${row.tracks} tracks; load average ${row.loadAverage1m.join(' → ')} on ${row.cpus} CPUs`,
      );
    }
  } finally {
    if (dir) rmSync(dir, { recursive: true, force: true });
  }
}

(isMainThread ? main() : workerMain()).catch((error: unknown) => {
  console.error(error);
  process.exit(1);
});
