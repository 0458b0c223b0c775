/**
 * Round trips of every committed fixture against the values numpy / h5py /
 * Python wrote (fixtures/datasets/generate.py). Tolerances:
 * - CSV, NPY, HDF5: exact. The files hold float64 text with ≥17 significant
 *   digits or binary float32/float64, and the expected JSON holds the same
 *   values widened to float64, so every value must come back bit-for-bit
 *   (±0 are treated as equal).
 * - WAV: the expected STFT is numpy's explicit sum Σ w[n]·x[n]·exp(−j2πkn/L)
 *   (no FFT); the reader uses fft.js. Allowed: 1e-10 × the largest |snapshot
 *   entry| of the file (both are float64 sums of ≤ 1024 terms; rounding is
 *   ~1e-13 relative).
 */
import { describe, expect, it } from 'vitest';
import { promises as fsp } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import csvExpected from '@/fixtures/datasets/csv-expected.json';
import npyExpected from '@/fixtures/datasets/npy-expected.json';
import hdf5Expected from '@/fixtures/datasets/hdf5-expected.json';
import wavExpected from '@/fixtures/datasets/wav-expected.json';
import {
  parseSnapshotFile,
  sha256File,
  Sha256PassThrough,
  toComplexMatrix,
  type ParsedSnapshots,
  type ParseOptions,
} from '@/lib/datasets';
import { createReadStream } from 'node:fs';
import { Writable } from 'node:stream';
import { pipeline } from 'node:stream/promises';

const FIX = path.resolve(__dirname, '../../../fixtures/datasets');

interface Rows {
  re: number[][];
  im: number[][];
}

/** Largest |difference| between parsed values and expected rows; also checks the shape. */
function maxDiff(parsed: ParsedSnapshots, expected: Rows): number {
  const N = expected.re.length;
  const M = expected.re[0].length;
  expect(parsed.snapshots).toBe(N);
  expect(parsed.elements).toBe(M);
  expect(parsed.re.length).toBe(N * M);
  expect(parsed.im.length).toBe(N * M);
  let worst = 0;
  for (let n = 0; n < N; n++) {
    for (let m = 0; m < M; m++) {
      worst = Math.max(
        worst,
        Math.abs(parsed.re[n * M + m] - expected.re[n][m]),
        Math.abs(parsed.im[n * M + m] - expected.im[n][m]),
      );
    }
  }
  return worst;
}

function maxAbs(expected: Rows): number {
  let big = 0;
  for (const part of [expected.re, expected.im])
    for (const row of part) for (const v of row) big = Math.max(big, Math.abs(v));
  return big;
}

describe('CSV fixtures (numpy.savetxt and Python-formatted text)', () => {
  for (const [name, exp] of Object.entries(csvExpected.files)) {
    it(`${name} reads back exactly (${exp.note})`, async () => {
      const parsed = await parseSnapshotFile({ path: path.join(FIX, 'csv', name), fileName: name });
      expect(parsed.format).toBe('csv');
      expect(maxDiff(parsed, exp)).toBe(0);
      if (parsed.details.kind !== 'csv') throw new Error('details kind');
      expect(parsed.details.header).toEqual(exp.header);
      expect(parsed.details.commentLines).toBe(exp.commentLines);
    });
  }
});

describe('NPY fixtures (numpy.save / numpy.lib.format.write_array)', () => {
  for (const [name, exp] of Object.entries(npyExpected.files)) {
    it(`${name}: ${exp.dtype} shape (${exp.shape.join(', ')}) v${exp.version}${exp.fortranOrder ? ' Fortran order' : ''} reads back exactly`, async () => {
      const parsed = await parseSnapshotFile({ path: path.join(FIX, 'npy', name) });
      expect(parsed.format).toBe('npy');
      expect(maxDiff(parsed, exp)).toBe(0);
      if (parsed.details.kind !== 'npy') throw new Error('details kind');
      expect(parsed.details.dtype).toBe(exp.dtype);
      expect(parsed.details.fortranOrder).toBe(exp.fortranOrder);
      expect(parsed.details.shape).toEqual(exp.shape);
      expect(parsed.details.version).toBe(`${exp.version}.0`);
    });
  }
});

describe('HDF5 fixtures (h5py)', () => {
  for (const [name, exp] of Object.entries(hdf5Expected.files)) {
    const guessable = name !== 'multi.h5';
    it(`${name}: ${exp.storage} storage reads back exactly${guessable ? ' with the dataset found automatically' : ''}`, async () => {
      const opts: ParseOptions = { path: path.join(FIX, 'hdf5', name) };
      if (!guessable) opts.datasetPath = exp.datasetPath;
      const parsed = await parseSnapshotFile(opts);
      expect(parsed.format).toBe('hdf5');
      expect(maxDiff(parsed, exp)).toBe(0);
      if (parsed.details.kind !== 'hdf5') throw new Error('details kind');
      expect(parsed.details.datasetPath).toBe(exp.datasetPath);
      expect(parsed.details.storage).toBe(exp.storage);
      expect(parsed.details.guessed).toBe(guessable);
    });
  }

  it('multi.h5: the other dataset by a path without the leading slash', async () => {
    const exp = hdf5Expected.files['multi.h5'];
    const parsed = await parseSnapshotFile({ path: path.join(FIX, 'hdf5', 'multi.h5'), datasetPath: 'runs/first' });
    expect(maxDiff(parsed, exp.others!['/runs/first'])).toBe(0);
  });
});

describe('WAV fixtures (stdlib struct writer, checked by scipy.io.wavfile) → STFT snapshots', () => {
  for (const [name, exp] of Object.entries(wavExpected.files)) {
    for (const c of exp.cases) {
      it(`${name} (${exp.bitsPerSample}-bit ${exp.sampleFormat}${exp.extensible ? ', extensible' : ''}): f=${c.frequencyHz} Hz L=${c.fftLength} hop=${c.hop} ${c.window}`, async () => {
        const isDefault = c.fftLength === 1024 && c.hop === 1024 && c.window === 'hann';
        const parsed = await parseSnapshotFile({
          path: path.join(FIX, 'wav', name),
          frequencyHz: c.frequencyHz,
          // exercise the documented defaults when the case uses them
          ...(isDefault
            ? {}
            : { fftLength: c.fftLength, hop: c.hop, window: c.window as 'hann' | 'hamming' | 'rectangular' }),
        });
        expect(parsed.format).toBe('wav');
        expect(parsed.sampleRate).toBe(exp.sampleRate);
        if (parsed.details.kind !== 'wav') throw new Error('details kind');
        expect(parsed.details.bin).toBe(c.bin);
        expect(parsed.details.channels).toBe(exp.channels);
        expect(parsed.details.bitsPerSample).toBe(exp.bitsPerSample);
        expect(parsed.details.extensible).toBe(exp.extensible);
        expect(parsed.details.samplesPerChannel).toBe(exp.samplesPerChannel);
        const tol = 1e-10 * maxAbs(c);
        expect(maxDiff(parsed, c)).toBeLessThanOrEqual(tol);
      });
    }
  }
});

describe('field spellings against Python complex()', () => {
  it('every spelling in the table parses to the value Python gives', async () => {
    const dir = await fsp.mkdtemp(path.join(os.tmpdir(), 'sw-spell-'));
    try {
      // two columns per row: the spelling and a fixed 0 (an array needs ≥ 2 elements)
      const text = csvExpected.spellings.map((s) => `${s.text},0`).join('\n');
      const file = path.join(dir, 'spellings.csv');
      await fsp.writeFile(file, text);
      const parsed = await parseSnapshotFile({ path: file });
      expect(parsed.snapshots).toBe(csvExpected.spellings.length);
      csvExpected.spellings.forEach((s, n) => {
        expect([s.text, parsed.re[2 * n] === s.re, parsed.im[2 * n] === s.im]).toEqual([s.text, true, true]);
      });
    } finally {
      await fsp.rm(dir, { recursive: true, force: true });
    }
  });
});

describe('SHA-256 (against Python hashlib in the expected JSON)', () => {
  const all: [string, string][] = [
    ...Object.entries(csvExpected.files).map(([n, e]) => [path.join(FIX, 'csv', n), e.sha256] as [string, string]),
    ...Object.entries(npyExpected.files).map(([n, e]) => [path.join(FIX, 'npy', n), e.sha256] as [string, string]),
    ...Object.entries(wavExpected.files).map(([n, e]) => [path.join(FIX, 'wav', n), e.sha256] as [string, string]),
    ...Object.entries(hdf5Expected.files).map(([n, e]) => [path.join(FIX, 'hdf5', n), e.sha256] as [string, string]),
  ];
  it('sha256File matches for every fixture', async () => {
    for (const [file, digest] of all)
      expect([path.basename(file), await sha256File(file)]).toEqual([path.basename(file), digest]);
  });
  it('Sha256PassThrough hashes what flows through it and passes the bytes on unchanged', async () => {
    const [file, digest] = all[all.length - 1];
    const tap = new Sha256PassThrough();
    let received = 0;
    await pipeline(
      createReadStream(file, { highWaterMark: 1000 }),
      tap,
      new Writable({
        write(chunk: Buffer, _e, cb) {
          received += chunk.length;
          cb();
        },
      }),
    );
    const size = (await fsp.stat(file)).size;
    expect(tap.digestHex()).toBe(digest);
    expect(tap.bytes).toBe(size);
    expect(received).toBe(size);
  });
});

describe('layout, format choice, progress and streaming boundaries', () => {
  it('toComplexMatrix gives M × N with X[m][n] = file row n, column m, and leaves the input alone', async () => {
    const exp = npyExpected.files['c16-fortran.npy'];
    const parsed = await parseSnapshotFile({ path: path.join(FIX, 'npy', 'c16-fortran.npy') });
    const before = parsed.re.slice();
    const X = toComplexMatrix(parsed);
    expect([X.rows, X.cols]).toEqual([exp.shape[1], exp.shape[0]]);
    for (let n = 0; n < X.cols; n++) {
      for (let m = 0; m < X.rows; m++) {
        expect(X.re[m * X.cols + n]).toBe(exp.re[n][m]);
        expect(X.im[m * X.cols + n]).toBe(exp.im[n][m]);
      }
    }
    expect(parsed.re).toEqual(before);
  });

  it('format option overrides the extension; the extension is case-insensitive', async () => {
    const dir = await fsp.mkdtemp(path.join(os.tmpdir(), 'sw-fmt-'));
    try {
      const src = path.join(FIX, 'npy', 'c16-c.npy');
      const bin = path.join(dir, 'upload.bin');
      await fsp.copyFile(src, bin);
      const a = await parseSnapshotFile({ path: bin, format: 'npy' });
      const b = await parseSnapshotFile({ path: bin, fileName: 'TRIAL.NPY' });
      expect(maxDiff(a, npyExpected.files['c16-c.npy'])).toBe(0);
      expect(b.re).toEqual(a.re);
    } finally {
      await fsp.rm(dir, { recursive: true, force: true });
    }
  });

  it('a multi-MiB CSV: rows and multi-byte text across 1 MiB chunk boundaries, progress reported', async () => {
    const dir = await fsp.mkdtemp(path.join(os.tmpdir(), 'sw-big-'));
    try {
      const file = path.join(dir, 'big.csv');
      // values k/7 + (k/3)j written with toString (shortest round-trip form)
      const M = 5;
      const lines: string[] = ['# ünïcode comment ✓ so chunk edges can split a multi-byte character', 'é0,é1,é2,é3,é4'];
      const N = 60000;
      for (let n = 0; n < N; n++) {
        const fields: string[] = [];
        for (let m = 0; m < M; m++) {
          const k = n * M + m;
          const re = k / 7;
          const im = -k / 3;
          fields.push(`${re}${im < 0 ? '' : '+'}${im}j`);
        }
        lines.push(fields.join(','));
      }
      await fsp.writeFile(file, lines.join('\n'));
      const size = (await fsp.stat(file)).size;
      expect(size).toBeGreaterThan(3 * 1024 * 1024);
      const progress: number[] = [];
      const parsed = await parseSnapshotFile({ path: file, onProgress: (p) => progress.push(p.bytesRead) });
      expect([parsed.snapshots, parsed.elements]).toEqual([N, M]);
      let bad = 0;
      for (let k = 0; k < N * M; k++) if (parsed.re[k] !== k / 7 || parsed.im[k] !== -k / 3) bad++;
      expect(bad).toBe(0);
      expect(progress.length).toBeGreaterThanOrEqual(3);
      expect(progress[progress.length - 1]).toBe(size);
      if (parsed.details.kind !== 'csv') throw new Error('details kind');
      expect(parsed.details.header).toEqual(['é0', 'é1', 'é2', 'é3', 'é4']);
    } finally {
      await fsp.rm(dir, { recursive: true, force: true });
    }
  });

  it('a multi-MiB NPY whose items straddle 1 MiB chunk boundaries (complex64 Fortran, big-endian)', async () => {
    const dir = await fsp.mkdtemp(path.join(os.tmpdir(), 'sw-bignpy-'));
    try {
      const N = 50001;
      const M = 7;
      // header padded so the data offset is odd-aligned relative to 1 MiB chunks
      const header = `{'descr': '>c8', 'fortran_order': True, 'shape': (${N}, ${M}), }`;
      const padded = header + ' '.repeat(13) + '\n';
      const pre = Buffer.alloc(10);
      Buffer.from([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0]).copy(pre);
      pre.writeUInt16LE(padded.length, 8);
      const data = Buffer.alloc(N * M * 8);
      // Fortran order: item q = m·N + n holds re = n + m/8, im = −n (exact in float32)
      for (let m = 0; m < M; m++) {
        for (let n = 0; n < N; n++) {
          const q = m * N + n;
          data.writeFloatBE(n + m / 8, q * 8);
          data.writeFloatBE(-n, q * 8 + 4);
        }
      }
      const file = path.join(dir, 'big.npy');
      await fsp.writeFile(file, Buffer.concat([pre, Buffer.from(padded, 'latin1'), data]));
      const parsed = await parseSnapshotFile({ path: file });
      let bad = 0;
      for (let n = 0; n < N; n++)
        for (let m = 0; m < M; m++) if (parsed.re[n * M + m] !== n + m / 8 || parsed.im[n * M + m] !== -n) bad++;
      expect(bad).toBe(0);
    } finally {
      await fsp.rm(dir, { recursive: true, force: true });
    }
  });

  it('an HDF5 dataset larger than one read block (written with h5wasm) comes back in order', async () => {
    const dir = await fsp.mkdtemp(path.join(os.tmpdir(), 'sw-bigh5-'));
    try {
      const file = path.join(dir, 'big.h5');
      const N = 300000;
      const M = 4;
      const data = new Float64Array(N * M * 2);
      for (let q = 0; q < N * M; q++) {
        data[2 * q] = q;
        data[2 * q + 1] = -q / 4;
      }
      const h5 = await import('h5wasm/node');
      await h5.ready;
      const out = new h5.File(file, 'w');
      out.create_dataset({ name: 'x', data, shape: [N, M, 2], dtype: '<d' });
      out.close();
      const parsed = await parseSnapshotFile({ path: file });
      expect([parsed.snapshots, parsed.elements]).toEqual([N, M]);
      let bad = 0;
      for (let q = 0; q < N * M; q++) if (parsed.re[q] !== q || parsed.im[q] !== -q / 4) bad++;
      expect(bad).toBe(0);
    } finally {
      await fsp.rm(dir, { recursive: true, force: true });
    }
  });

  it('abort: a fired signal rejects with its reason', async () => {
    const controller = new AbortController();
    const reason = new Error('stopped by test');
    controller.abort(reason);
    await expect(
      parseSnapshotFile({ path: path.join(FIX, 'csv', 'plain-j.csv'), signal: controller.signal }),
    ).rejects.toBe(reason);
  });
});
