/**
 * Ranged reads of stored recordings (lib/storage/shared.ts `objectRanges`, the time-series
 * reader on byte ranges): a WAV and an NPY put into S3 as served by s3rver (a local S3 fake,
 * no mocks) open with the same header and give the same samples as the local files, while
 * only the header and the blocks asked for are fetched; a shortened object is refused with
 * the same error as a shortened file. This is how a web process reads a recording's header
 * when a bearing–time record is created, without downloading the recording.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { S3Store } from '@/lib/storage/object-store';
import { objectRanges } from '@/lib/storage/shared';
import { openTimeSeries, type TimeSeriesOptions } from '@/lib/datasets/time-series';
import type { ByteRanges } from '@/lib/datasets/io';
import { writeSimulatedWav } from '@/lib/btr/simulated-wav';
import { startS3Fake, type S3Fake } from '../../../scripts/s3-fake';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'steerwise-ranges-'));
const wav = path.join(dir, 'line.wav');
const npy = path.join(dir, 'line.npy');
let server: S3Fake;
let store: S3Store;

/** An NPY file of shape (samples, channels), float32 little-endian, written by hand (NPY format 1.0). */
function writeNpy(file: string, samples: number, channels: number): void {
  let header = `{'descr': '<f4', 'fortran_order': False, 'shape': (${samples}, ${channels}), }`;
  header += ' '.repeat(64 - ((10 + header.length + 1) % 64)) + '\n';
  const pre = Buffer.alloc(10);
  Buffer.from([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0]).copy(pre);
  pre.writeUInt16LE(header.length, 8);
  const data = new Float32Array(samples * channels);
  for (let i = 0; i < data.length; i++) data[i] = Math.sin(0.001 * i) * ((i % channels) + 1);
  fs.writeFileSync(file, Buffer.concat([pre, Buffer.from(header, 'latin1'), Buffer.from(data.buffer)]));
}

/** Counts the bytes a range source fetches. */
function counted(r: ByteRanges): ByteRanges & { fetched: () => number } {
  let n = 0;
  return {
    size: r.size,
    read: async (start, end) => {
      const b = await r.read(start, end);
      n += b.length;
      return b;
    },
    fetched: () => n,
  };
}

async function samplesAt(options: TimeSeriesOptions, first: number, count: number): Promise<Float32Array[]> {
  const src = await openTimeSeries(options);
  try {
    const out = Array.from({ length: src.channels }, () => new Float32Array(count));
    await src.seek!(first);
    expect(await src.read(out, 0, count)).toBe(count);
    return out;
  } finally {
    await src.close();
  }
}

beforeAll(async () => {
  // 20 s of the tiny line (4 elements, 4 kHz, 16-bit): about 640 kB.
  await writeSimulatedWav(wav, {
    elements: 4,
    spacingM: 0.25,
    propagationSpeedMps: 1500,
    sampleRate: 4000,
    durationS: 20,
    sources: [{ trajectory: [{ tS: 0, bearingDeg: 20 }], rms: 0.05, bandHz: [400, 1600] }],
    noiseRms: 0.01,
    seed: 3,
    firTaps: 63,
  });
  writeNpy(npy, 50_000, 4);
  server = await startS3Fake({ directory: path.join(dir, 's3'), bucket: 'steerwise-ranges' });
  store = new S3Store({
    bucket: 'steerwise-ranges',
    endpoint: server.endpoint,
    region: 'us-east-1',
    accessKeyId: 'S3RVER',
    secretAccessKey: 'S3RVER',
  });
  await store.putFile('datasets/1/line.wav', wav);
  await store.putFile('datasets/1/line.npy', npy);
  const bytes = fs.readFileSync(wav);
  fs.writeFileSync(path.join(dir, 'short.wav'), bytes.subarray(0, bytes.length - 1000));
  await store.putFile('datasets/1/short.wav', path.join(dir, 'short.wav'));
});

afterAll(async () => {
  await server?.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe.each([
  ['wav', 'datasets/1/line.wav', () => wav, {}],
  ['npy', 'datasets/1/line.npy', () => npy, { sampleRate: 8000 }],
] as const)('a %s recording on S3, read by ranges', (format, key, local, extra) => {
  it('has the local file’s header; opening fetches the header only', async () => {
    const ranges = counted(await objectRanges(store, key));
    expect(ranges.size).toBe(fs.statSync(local()).size);
    const remote = await openTimeSeries({ path: ranges, format, ...extra });
    await remote.close();
    const here = await openTimeSeries({ path: local(), format, ...extra });
    await here.close();
    expect({ ...remote.details }).toEqual({ ...here.details });
    expect([remote.channels, remote.sampleRate, remote.samplesPerChannel]).toEqual([
      here.channels,
      here.sampleRate,
      here.samplesPerChannel,
    ]);
    // WAV: the header reader's first 64 KiB prefix; NPY: the 12-byte preamble and the header.
    expect(ranges.fetched()).toBeLessThanOrEqual(64 * 1024);
    expect(ranges.fetched()).toBeLessThan(ranges.size / 5);
  });

  it('gives the same samples as the local file for a block in the middle, fetching about that block', async () => {
    const ranges = counted(await objectRanges(store, key));
    const first = 30_001;
    const count = 2048;
    const remote = await samplesAt({ path: ranges, format, ...extra }, first, count);
    const here = await samplesAt({ path: local(), format, ...extra }, first, count);
    for (let c = 0; c < here.length; c++) expect(Array.from(remote[c])).toEqual(Array.from(here[c]));
    expect(ranges.fetched()).toBeLessThan(64 * 1024 + count * here.length * 4 + 1);
  });
});

it('a shortened object is refused as a shortened file is (truncated)', async () => {
  const ranges = await objectRanges(store, 'datasets/1/short.wav');
  const fromS3 = await openTimeSeries({ path: ranges, format: 'wav' }).then(
    () => null,
    (e: { code?: string; message: string }) => e,
  );
  const fromDisk = await openTimeSeries({ path: path.join(dir, 'short.wav'), format: 'wav' }).then(
    () => null,
    (e: { code?: string; message: string }) => e,
  );
  expect(fromS3?.code).toBe('truncated');
  expect(fromS3?.message).toBe(fromDisk?.message);
});
