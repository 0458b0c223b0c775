/**
 * Hostile-input corpus for the snapshot-file readers. Each case must be
 * refused with a DatasetError carrying the right HTTP status (docs/conventions.md §7:
 * 413 too large, 415 unsupported format, 422 invalid content), the stable
 * code, and a message that names the place (row/column for CSV, the dtype,
 * shape, dataset path or channel count for the binary formats). Rows and
 * columns are 1-based and count physical file lines (docs/conventions.md §6).
 *
 * Most inputs are built here in a temporary directory; a few tiny ones
 * (one-channel, zero-length, 8-bit and 64-bit-float WAVs, HDF5 files without a
 * usable dataset) are written by fixtures/datasets/generate.py.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { promises as fsp } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { DatasetError, parseSnapshotFile, type ParseOptions } from '@/lib/datasets';
import { float64LE, garbage, npy } from '../../helpers/hostile-bytes';

const FIX = path.resolve(__dirname, '../../../fixtures/datasets');
let dir = '';

beforeAll(async () => {
  dir = await fsp.mkdtemp(path.join(os.tmpdir(), 'sw-hostile-'));
});
afterAll(async () => {
  if (dir) await fsp.rm(dir, { recursive: true, force: true });
});

function csvRows(n: number, m: number): string {
  const rows: string[] = [];
  for (let i = 0; i < n; i++) rows.push(Array.from({ length: m }, (_, k) => `${i + k * 0.5}+${k}j`).join(','));
  return rows.join('\n') + '\n';
}

async function fixtureBytes(...parts: string[]): Promise<Buffer> {
  return fsp.readFile(path.join(FIX, ...parts));
}

/** Offset of the first 'data' chunk body in a WAV buffer (test helper only). */
function wavDataOffset(b: Buffer): number {
  let i = 12;
  while (i + 8 <= b.length) {
    const id = b.toString('latin1', i, i + 4);
    const size = b.readUInt32LE(i + 4);
    if (id === 'data') return i + 8;
    i += 8 + size + (size % 2);
  }
  throw new Error('no data chunk');
}

interface Case {
  name: string;
  file: string;
  content: () => Buffer | string | Promise<Buffer | string>;
  options?: Partial<ParseOptions>;
  status: 413 | 415 | 422 | 500;
  code: string | RegExp;
  /** Substrings the message must contain (the place and the reason). */
  says: (string | RegExp)[];
  location?: { row?: number; column?: number };
}

const cases: Case[] = [
  // ---------------------------------------------------------------- CSV
  {
    name: 'ragged row: too few fields',
    file: 'a.csv',
    content: () => '1,2,3\n4,5\n',
    status: 422,
    code: 'ragged-row',
    says: ['row 2', 'has 2 fields', 'row 1 has 3'],
    location: { row: 2, column: 3 },
  },
  {
    name: 'ragged row: too many fields',
    file: 'a.csv',
    content: () => '1,2\n3,4\n5,6,7\n',
    status: 422,
    code: 'ragged-row',
    says: ['row 3', 'more than 2'],
    location: { row: 3, column: 3 },
  },
  {
    name: 'NaN field',
    file: 'a.csv',
    content: () => '1,2\n3,nan\n',
    status: 422,
    code: 'not-finite',
    says: ['row 2, column 2', "'nan'"],
    location: { row: 2, column: 2 },
  },
  {
    name: 'Inf field',
    file: 'a.csv',
    content: () => '1,-Inf\n',
    status: 422,
    code: 'not-finite',
    says: ['row 1, column 2', "'-Inf'"],
  },
  {
    name: 'Infinity inside a complex value',
    file: 'a.csv',
    content: () => '1,2\n3,1+infinityj\n',
    status: 422,
    code: 'not-finite',
    says: ['row 2, column 2'],
  },
  {
    name: 'overflow to infinity (1e400)',
    file: 'a.csv',
    content: () => '1,1e400\n',
    status: 422,
    code: 'not-finite',
    says: ['row 1, column 2', "'1e400'"],
  },
  { name: 'empty file', file: 'a.csv', content: () => '', status: 422, code: 'empty-file', says: ['empty'] },
  {
    name: 'only blank lines',
    file: 'a.txt',
    content: () => '\n  \n\t\n',
    status: 422,
    code: 'empty-file',
    says: ['empty'],
  },
  {
    name: 'header only',
    file: 'a.csv',
    content: () => 'ch0,ch1,ch2\n',
    status: 422,
    code: 'no-snapshots',
    says: ['header row (row 1)', 'no snapshot rows'],
  },
  {
    name: 'comments only',
    file: 'a.csv',
    content: () => '# nothing here\n# still nothing\n',
    status: 422,
    code: 'no-snapshots',
    says: ['no snapshot rows'],
  },
  {
    name: 'empty field in the middle',
    file: 'a.csv',
    content: () => '1,2,3\n1,,3\n',
    status: 422,
    code: 'empty-field',
    says: ['row 2, column 2', 'empty'],
    location: { row: 2, column: 2 },
  },
  {
    name: 'trailing comma (empty last field)',
    file: 'a.csv',
    content: () => '1,2,\n',
    status: 422,
    code: 'empty-field',
    says: ['row 1, column 3'],
  },
  {
    name: "the issue's example: row 812, column 5 is 'abc'",
    file: 'a.csv',
    content: () => csvRows(811, 6) + '1,2,3,4,abc,6\n',
    status: 422,
    code: 'not-a-number',
    says: ["row 812, column 5: 'abc' is not a number"],
    location: { row: 812, column: 5 },
  },
  {
    name: 'row numbers count comment and blank lines',
    file: 'a.csv',
    content: () => '# c\n\nx,y\n1,2\n\n# mid\n3,oops\n',
    status: 422,
    code: 'not-a-number',
    says: ["row 7, column 2: 'oops' is not a number"],
    location: { row: 7, column: 2 },
  },
  {
    name: 'binary bytes inside a text row',
    file: 'a.csv',
    content: () => Buffer.concat([Buffer.from('1,2\n'), Buffer.from([0, 1, 0xff, 0xfe]), Buffer.from(',3\n')]),
    status: 422,
    code: 'binary-content',
    says: ['row 2, column 1', 'binary'],
  },
  {
    name: 'random binary garbage named .csv',
    file: 'g.csv',
    content: () => garbage(4096, 7),
    status: 422,
    code: /binary-content|not-a-number|ragged-row|empty-field|too-few-elements/,
    says: [/row \d+/],
  },
  {
    name: 'one column (an array needs ≥ 2 elements)',
    file: 'a.csv',
    content: () => '1\n2\n3\n',
    status: 422,
    code: 'too-few-elements',
    says: ['row 1', '1 column', 'at least 2'],
  },
  {
    name: 'one-column header',
    file: 'a.csv',
    content: () => 'x\n1\n',
    status: 422,
    code: 'too-few-elements',
    says: ['row 1', 'at least 2'],
  },
  {
    name: 'extremely long line (2 MiB, no newline)',
    file: 'a.csv',
    content: () => '1,'.repeat(1024 * 1024) + '1',
    status: 422,
    code: 'line-too-long',
    says: ['row 1', 'longer than'],
  },
  {
    name: 'space inside a complex number',
    file: 'a.csv',
    content: () => '1 + 2j,3\n',
    status: 422,
    code: 'not-a-number',
    says: ["row 1, column 1: '1 + 2j' is not a number"],
  },
  {
    name: 'double sign',
    file: 'a.csv',
    content: () => '1,1++2j\n',
    status: 422,
    code: 'not-a-number',
    says: ['row 1, column 2'],
  },
  {
    name: 'unit before the coefficient',
    file: 'a.csv',
    content: () => '1,j2\n',
    status: 422,
    code: 'not-a-number',
    says: ["row 1, column 2: 'j2'"],
  },
  {
    name: 'hexadecimal',
    file: 'a.csv',
    content: () => '0x10,1\n',
    status: 422,
    code: 'not-a-number',
    says: ["row 1, column 1: '0x10'"],
  },
  {
    name: 'exponent without digits',
    file: 'a.csv',
    content: () => '1e,1\n',
    status: 422,
    code: 'not-a-number',
    says: ["row 1, column 1: '1e'"],
  },
  {
    name: 'unclosed parenthesis',
    file: 'a.csv',
    content: () => '(1+2j,3\n',
    status: 422,
    code: 'not-a-number',
    says: ["row 1, column 1: '(1+2j'"],
  },
  {
    name: 'header and data disagree on the column count',
    file: 'a.csv',
    content: () => 'a,b,c\n1,2\n',
    status: 422,
    code: 'ragged-row',
    says: ['row 2', 'row 1 has 3'],
  },
  {
    name: 'CRLF file: the CR is not part of the quoted field',
    file: 'a.csv',
    content: () => '1,2\r\n3,zz\r\n',
    status: 422,
    code: 'not-a-number',
    says: ["row 2, column 2: 'zz' is not a number"],
  },
  {
    name: 'oversize file (maxBytes)',
    file: 'a.csv',
    content: () => csvRows(20, 4),
    options: { maxBytes: 100 },
    status: 413,
    code: 'file-too-large',
    says: ['the limit is 100 bytes'],
  },
  {
    name: 'too many values (maxValues)',
    file: 'a.csv',
    content: () => csvRows(20, 4),
    options: { maxValues: 50 },
    status: 413,
    code: 'file-too-large',
    says: ['20 snapshots × 4 elements', 'limit is 50'],
  },

  // ---------------------------------------------------------------- NPY
  {
    name: "wrong dtype '<i4'",
    file: 'a.npy',
    content: () => npy("{'descr': '<i4', 'fortran_order': False, 'shape': (2, 2), }", Buffer.alloc(16)),
    status: 415,
    code: 'unsupported-dtype',
    says: ["NPY dtype '<i4' is not supported: use complex64, complex128, float32 or float64"],
  },
  {
    name: "boolean dtype '|b1'",
    file: 'a.npy',
    content: () => npy("{'descr': '|b1', 'fortran_order': False, 'shape': (2, 2), }", Buffer.alloc(4)),
    status: 415,
    code: 'unsupported-dtype',
    says: ["'|b1'"],
  },
  {
    name: "object dtype '|O'",
    file: 'a.npy',
    content: () => npy("{'descr': '|O', 'fortran_order': False, 'shape': (2,), }", Buffer.alloc(16)),
    status: 415,
    code: 'unsupported-dtype',
    says: ["'|O'"],
  },
  {
    name: 'structured dtype (a list)',
    file: 'a.npy',
    content: () =>
      npy("{'descr': [('r', '<f8'), ('i', '<f8')], 'fortran_order': False, 'shape': (2, 2), }", Buffer.alloc(64)),
    status: 415,
    code: 'unsupported-dtype',
    says: ['structured'],
  },
  {
    name: 'long double complex (c32)',
    file: 'a.npy',
    content: () => npy("{'descr': '<c32', 'fortran_order': False, 'shape': (1, 2), }", Buffer.alloc(64)),
    status: 415,
    code: 'unsupported-dtype',
    says: ["'<c32'"],
  },
  {
    name: 'truncated header',
    file: 'a.npy',
    content: () => npy("{'descr': '<c16', 'fortran_order': False, 'shape': (2, 2), }", Buffer.alloc(0)).subarray(0, 40),
    status: 422,
    code: 'truncated',
    says: ['header', 'cut short'],
  },
  {
    name: 'file shorter than the preamble',
    file: 'a.npy',
    content: () => Buffer.from([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0]),
    status: 422,
    code: 'truncated',
    says: ['8 bytes'],
  },
  {
    name: 'bad magic',
    file: 'a.npy',
    content: () => garbage(256, 11),
    status: 422,
    code: 'bad-magic',
    says: ['not an NPY file'],
  },
  {
    name: 'lying shape: header says more than the data',
    file: 'a.npy',
    content: () =>
      npy("{'descr': '<c16', 'fortran_order': False, 'shape': (10, 4), }", float64LE(new Array(5 * 4 * 2).fill(1))),
    status: 422,
    code: 'shape-mismatch',
    says: ['(10, 4)', 'complex128', '640 bytes', 'holds 320 bytes'],
  },
  {
    name: 'lying shape: data longer than the header says',
    file: 'a.npy',
    content: () => npy("{'descr': '<c16', 'fortran_order': False, 'shape': (1, 2), }", float64LE(new Array(8).fill(1))),
    status: 422,
    code: 'shape-mismatch',
    says: ['(1, 2)', '32 bytes', 'holds 64 bytes'],
  },
  {
    name: 'three-dimensional array',
    file: 'a.npy',
    content: () => npy("{'descr': '<f8', 'fortran_order': False, 'shape': (2, 2, 2), }", Buffer.alloc(64)),
    status: 422,
    code: 'bad-shape',
    says: ['(2, 2, 2)', '(N, M)'],
  },
  {
    name: 'zero-dimensional array',
    file: 'a.npy',
    content: () => npy("{'descr': '<f8', 'fortran_order': False, 'shape': (), }", Buffer.alloc(8)),
    status: 422,
    code: 'bad-shape',
    says: ['()'],
  },
  {
    name: 'one element per snapshot',
    file: 'a.npy',
    content: () => npy("{'descr': '<f8', 'fortran_order': False, 'shape': (5, 1), }", Buffer.alloc(40)),
    status: 422,
    code: 'too-few-elements',
    says: ['(5, 1)', 'at least 2'],
  },
  {
    name: 'no snapshots (shape (0, 4))',
    file: 'a.npy',
    content: () => npy("{'descr': '<c8', 'fortran_order': False, 'shape': (0, 4), }", Buffer.alloc(0)),
    status: 422,
    code: 'no-snapshots',
    says: ['(0, 4)'],
  },
  {
    name: 'NaN in the data',
    file: 'a.npy',
    content: () =>
      npy("{'descr': '<c16', 'fortran_order': False, 'shape': (2, 2), }", float64LE([1, 0, 2, 0, 3, NaN, 4, 0])),
    status: 422,
    code: 'not-finite',
    says: ['row 2, column 1', 'NaN'],
    location: { row: 2, column: 1 },
  },
  {
    name: 'unknown NPY version 4.0',
    file: 'a.npy',
    content: () => npy("{'descr': '<f8', 'fortran_order': False, 'shape': (1, 2), }", Buffer.alloc(16), { major: 4 }),
    status: 415,
    code: 'unsupported-format',
    says: ['version 4.0'],
  },
  {
    name: 'header is not a complete dictionary',
    file: 'a.npy',
    content: () => npy("{'descr': '<f8', 'fortran_order': False, 'shape': (1, 2)", Buffer.alloc(16)),
    status: 422,
    code: 'bad-header',
    says: ['NPY header'],
  },
  {
    name: 'header without a shape entry',
    file: 'a.npy',
    content: () => npy("{'descr': '<f8', 'fortran_order': False}", Buffer.alloc(16)),
    status: 422,
    code: 'bad-header',
    says: ["'shape'"],
  },
  {
    name: 'implausible header length',
    file: 'a.npy',
    content: () =>
      npy("{'descr': '<f8', 'fortran_order': False, 'shape': (1, 2), }", Buffer.alloc(16), {
        major: 2,
        declaredLength: 0xfffffff0,
      }),
    status: 422,
    code: 'bad-header',
    says: ['header length'],
  },
  { name: 'empty .npy', file: 'a.npy', content: () => '', status: 422, code: 'empty-file', says: ['empty'] },

  // ---------------------------------------------------------------- HDF5
  {
    name: 'random bytes named .h5',
    file: 'g.h5',
    content: () => garbage(8192, 3),
    status: 422,
    code: 'corrupt',
    says: ['HDF5', 'Not an HDF5 file'],
  },
  {
    name: 'truncated HDF5 file',
    file: 't.h5',
    content: async () => (await fixtureBytes('hdf5', 'multi.h5')).subarray(0, 3000),
    status: 422,
    code: 'truncated',
    says: ['HDF5', 'truncated'],
  },
  {
    name: 'HDF5 with no 2-D dataset',
    file: 'n.h5',
    content: () => fixtureBytes('hostile', 'no-2d.h5'),
    status: 422,
    code: 'no-2d-dataset',
    says: ['no 2-D dataset', '/a', '/b/c'],
  },
  {
    name: 'HDF5 dataset path that does not exist',
    file: 'm.h5',
    content: () => fixtureBytes('hdf5', 'multi.h5'),
    options: { datasetPath: '/runs/third' },
    status: 422,
    code: 'dataset-not-found',
    says: ["'/runs/third' was not found", '/runs/first', '/runs/second'],
  },
  {
    name: 'HDF5 with two candidate datasets and no path',
    file: 'm.h5',
    content: () => fixtureBytes('hdf5', 'multi.h5'),
    status: 422,
    code: 'ambiguous-dataset',
    says: ['/runs/first', '/runs/second', 'datasetPath'],
  },
  {
    name: 'HDF5 path naming a group',
    file: 'm.h5',
    content: () => fixtureBytes('hdf5', 'multi.h5'),
    options: { datasetPath: 'runs' },
    status: 422,
    code: 'dataset-not-found',
    says: ["'/runs'", 'Group'],
  },
  {
    name: 'HDF5 path naming a 1-D dataset',
    file: 'm.h5',
    content: () => fixtureBytes('hdf5', 'multi.h5'),
    options: { datasetPath: '/notes/gain' },
    status: 422,
    code: 'bad-shape',
    says: ["'/notes/gain'", 'shape (3)'],
  },
  {
    name: 'HDF5 integer dataset',
    file: 'i.h5',
    content: () => fixtureBytes('hostile', 'int-2d.h5'),
    status: 415,
    code: 'unsupported-dtype',
    says: ["'/counts'", '32-bit integers'],
  },
  { name: 'empty .h5', file: 'e.h5', content: () => '', status: 422, code: 'empty-file', says: ['empty'] },

  // ---------------------------------------------------------------- WAV
  {
    name: 'one-channel WAV',
    file: 'o.wav',
    content: () => fixtureBytes('hostile', 'one-channel.wav'),
    options: { frequencyHz: 1000 },
    status: 422,
    code: 'too-few-channels',
    says: ['WAV has 1 channel; an array needs at least 2'],
  },
  {
    name: 'zero-length WAV (empty data chunk)',
    file: 'z.wav',
    content: () => fixtureBytes('hostile', 'zero-length.wav'),
    options: { frequencyHz: 1000 },
    status: 422,
    code: 'no-snapshots',
    says: ['no samples'],
  },
  {
    name: '8-bit PCM WAV (refused, not in §6)',
    file: 'b.wav',
    content: () => fixtureBytes('hostile', 'pcm8-2ch.wav'),
    options: { frequencyHz: 1000 },
    status: 415,
    code: 'unsupported-sample-format',
    says: ['8-bit PCM'],
  },
  {
    name: '64-bit float WAV',
    file: 'f.wav',
    content: () => fixtureBytes('hostile', 'float64-2ch.wav'),
    options: { frequencyHz: 1000 },
    status: 415,
    code: 'unsupported-sample-format',
    says: ['64-bit float'],
  },
  {
    name: 'frequency above Nyquist',
    file: 'p.wav',
    content: () => fixtureBytes('wav', 'pcm16-3ch.wav'),
    options: { frequencyHz: 4500 },
    status: 422,
    code: 'frequency-above-nyquist',
    says: ['4500 Hz', 'Nyquist frequency 4000 Hz'],
  },
  {
    name: 'no analysis frequency',
    file: 'p.wav',
    content: () => fixtureBytes('wav', 'pcm16-3ch.wav'),
    status: 422,
    code: 'missing-frequency',
    says: ['frequencyHz'],
  },
  {
    name: 'negative analysis frequency',
    file: 'p.wav',
    content: () => fixtureBytes('wav', 'pcm16-3ch.wav'),
    options: { frequencyHz: -5 },
    status: 422,
    code: 'bad-option',
    says: ['-5 Hz'],
  },
  {
    name: 'fewer samples than one frame',
    file: 's.wav',
    content: () => fixtureBytes('hostile', 'short-2ch.wav'),
    options: { frequencyHz: 1000 },
    status: 422,
    code: 'too-few-samples',
    says: ['300 samples per channel', 'needs 1024'],
  },
  {
    name: 'FFT length not a power of two',
    file: 'p.wav',
    content: () => fixtureBytes('wav', 'pcm16-3ch.wav'),
    options: { frequencyHz: 1000, fftLength: 1000 },
    status: 422,
    code: 'bad-option',
    says: ['FFT length 1000', 'power of two'],
  },
  {
    name: 'hop of zero',
    file: 'p.wav',
    content: () => fixtureBytes('wav', 'pcm16-3ch.wav'),
    options: { frequencyHz: 1000, hop: 0 },
    status: 422,
    code: 'bad-option',
    says: ['hop 0'],
  },
  {
    name: 'unknown window',
    file: 'p.wav',
    content: () => fixtureBytes('wav', 'pcm16-3ch.wav'),
    options: { frequencyHz: 1000, window: 'kaiser' as never },
    status: 422,
    code: 'bad-option',
    says: ["'kaiser'"],
  },
  {
    name: 'truncated WAV (data chunk cut in half)',
    file: 't.wav',
    content: async () => {
      const b = await fixtureBytes('wav', 'pcm16-3ch.wav');
      return b.subarray(0, b.length >> 1);
    },
    options: { frequencyHz: 1000 },
    status: 422,
    code: 'truncated',
    says: ['data chunk', 'cut short'],
  },
  {
    name: 'random bytes named .wav',
    file: 'g.wav',
    content: () => garbage(2048, 5),
    options: { frequencyHz: 1000 },
    status: 422,
    code: 'bad-magic',
    says: ['not a WAV file'],
  },
  {
    name: 'RIFF header with no chunks',
    file: 'h.wav',
    content: () => Buffer.from('RIFF\x04\x00\x00\x00WAVE', 'latin1'),
    options: { frequencyHz: 1000 },
    status: 422,
    code: 'corrupt',
    says: ['WAV header'],
  },
  {
    name: 'NaN sample in a float WAV',
    file: 'n.wav',
    content: async () => {
      const b = Buffer.from(await fixtureBytes('wav', 'float32-3ch.wav'));
      b.writeFloatLE(NaN, wavDataOffset(b) + 4 * (3 * 10 + 1)); // sample 11, channel 2
      return b;
    },
    options: { frequencyHz: 1000 },
    status: 422,
    code: 'not-finite',
    says: ['sample 11 of channel 2', 'NaN'],
  },

  // ---------------------------------------------------------------- general
  {
    name: 'unknown extension',
    file: 'data.mat',
    content: () => 'x',
    status: 415,
    code: 'unsupported-format',
    says: ["'data.mat'", '.csv, .txt, .npy, .h5, .hdf5 or .wav'],
  },
  {
    name: 'no extension',
    file: 'README',
    content: () => '1,2\n',
    status: 415,
    code: 'unsupported-format',
    says: ["'README'"],
  },
];

describe(`hostile corpus (${cases.length} cases)`, () => {
  it('has at least 40 cases', () => {
    expect(cases.length).toBeGreaterThanOrEqual(40);
  });

  cases.forEach((c, index) => {
    it(`${c.status} ${typeof c.code === 'string' ? c.code : 'any'}: ${c.name}`, async () => {
      const sub = path.join(dir, String(index));
      await fsp.mkdir(sub, { recursive: true });
      const file = path.join(sub, c.file);
      await fsp.writeFile(file, await c.content());
      let caught: unknown = null;
      try {
        await parseSnapshotFile({ path: file, fileName: c.file, ...c.options });
      } catch (error) {
        caught = error;
      }
      expect(caught).toBeInstanceOf(DatasetError);
      const e = caught as DatasetError;
      expect({ status: e.status, code: e.code }).toMatchObject({
        status: c.status,
        code: expect.stringMatching(typeof c.code === 'string' ? new RegExp(`^${c.code}$`) : c.code),
      });
      for (const part of c.says) {
        if (typeof part === 'string') expect(e.message).toContain(part);
        else expect(e.message).toMatch(part);
      }
      if (c.location) expect(e.location).toEqual(c.location);
      // messages stay short and printable whatever the input
      expect(e.message.length).toBeLessThan(400);
      expect(e.message).not.toMatch(/[\u0000-\u001f]/);
    });
  });

  it('a missing file is a 500 io-error, not a crash', async () => {
    await expect(parseSnapshotFile({ path: path.join(dir, 'nope.csv') })).rejects.toMatchObject({
      status: 500,
      code: 'io-error',
    });
  });
});
