/**
 * Streaming multichannel time-series readers for bearing–time records
 * (docs/conventions.md §9): a stored WAV or NPY file becomes a SampleSource
 * (lib/doa/wideband/source.ts) that hands out consecutive samples per channel
 * as float32, read from disk in pieces of about 1 MiB. Nothing holds the whole
 * recording: memory is one piece of raw bytes plus what the caller asks for.
 * The recording may also be byte ranges of a stored object (io.ts ByteRanges):
 * then only the header and the pieces asked for are fetched.
 *
 * WAV: the formats and header checks of wav.ts (readWavLayout, checkWavData,
 * decodeWavSamples): PCM 16/24/32-bit or float32, integer PCM scaled by
 * 1/2^(bits−1). The sample rate comes from the header.
 * NPY: a real float32 or float64 array of shape (S, C), one sample per row and
 * one channel per column (the row layout of docs/conventions.md §6), C order,
 * either byte order; the sample rate must be given. Complex dtypes, Fortran
 * order and 1-D arrays are refused (a 1-D array is one channel).
 *
 * Errors are DatasetError (422 for content, 415 for encodings, 413 for size):
 * fewer than 2 channels, an empty data section, a file shorter than its header
 * says ('truncated', checked when opened and again if the file shrinks while
 * read), non-finite samples (with 1-based sample and channel).
 */
import { promises as fsp } from 'node:fs';
import type { SampleSource } from '../doa/wideband/source';
import { DatasetError, invalid, unsupported } from './errors';
import { CHUNK_BYTES, checkedFileSize, checkedRangeSize, type ByteRanges, type ByteSource } from './io';
import { readNpyHeader } from './npy';
import { checkWavData, decodeWavSamples, readWavLayout } from './wav';

export type TimeSeriesFormat = 'wav' | 'npy';

export interface TimeSeriesOptions {
  /** The recording: a local file, or byte ranges of a stored object (only the bytes read are fetched). */
  path: ByteSource;
  /** Default from the extension of fileName (or path): .wav or .npy. */
  format?: TimeSeriesFormat;
  fileName?: string;
  /** NPY only (required there): samples per second. */
  sampleRate?: number;
  /** Largest accepted file (413 above it); default that of the snapshot readers (200 MiB). */
  maxBytes?: number;
}

export interface TimeSeriesSource extends SampleSource {
  readonly format: TimeSeriesFormat;
  readonly details: Record<string, unknown>;
}

function formatOf(options: TimeSeriesOptions): TimeSeriesFormat {
  if (options.format) {
    if (options.format !== 'wav' && options.format !== 'npy') {
      throw new DatasetError(
        415,
        'unsupported-format',
        `format ${String(options.format)} is not a time series: use wav or npy`,
      );
    }
    return options.format;
  }
  const name = (options.fileName ?? (typeof options.path === 'string' ? options.path : '')).toLowerCase();
  if (name.endsWith('.wav')) return 'wav';
  if (name.endsWith('.npy')) return 'npy';
  throw new DatasetError(415, 'unsupported-format', 'a bearing–time record reads .wav or .npy recordings');
}

interface Layout {
  channels: number;
  sampleRate: number;
  samplesPerChannel: number;
  dataStart: number;
  bytesPerFrame: number;
  decode: (buf: Buffer, count: number, out: Float32Array[], offset: number, firstSample: number) => void;
  details: Record<string, unknown>;
}

async function wavLayout(path: ByteSource, size: number): Promise<Layout> {
  const layout = await readWavLayout(path, size);
  checkWavData(layout, size);
  return {
    channels: layout.channels,
    sampleRate: layout.sampleRate,
    samplesPerChannel: layout.samplesPerChannel,
    dataStart: layout.dataStart,
    bytesPerFrame: layout.blockAlign,
    decode: (buf, count, out, offset, first) => decodeWavSamples(layout, buf, count, out, offset, first),
    details: {
      kind: 'wav',
      channels: layout.channels,
      sampleRate: layout.sampleRate,
      bitsPerSample: layout.bitsPerSample,
      sampleFormat: layout.sampleFormat,
      samplesPerChannel: layout.samplesPerChannel,
    },
  };
}

async function npyLayout(path: ByteSource, size: number, sampleRate: number | undefined): Promise<Layout> {
  const h = await readNpyHeader(path, size);
  const code = h.descr.slice(1);
  if (code !== 'f4' && code !== 'f8') {
    throw unsupported('unsupported-dtype', `NPY dtype ${h.descr} is not a real recording: use float32 or float64`);
  }
  if (h.shape.length !== 2) {
    throw invalid(
      'bad-shape',
      `NPY array has shape (${h.shape.join(', ')}${h.shape.length === 1 ? ',' : ''}); a recording needs shape (samples, channels) with at least 2 channels`,
    );
  }
  if (h.fortranOrder) {
    throw invalid('bad-shape', 'NPY array is in Fortran order; store the recording in C order (one sample per row)');
  }
  const [samples, channels] = h.shape;
  if (channels < 2) {
    throw invalid(
      'too-few-channels',
      `NPY recording has ${channels} channel${channels === 1 ? '' : 's'}; an array needs at least 2`,
    );
  }
  if (samples === 0) throw invalid('no-snapshots', 'NPY recording holds no samples');
  if (sampleRate === undefined || !(Number.isFinite(sampleRate) && sampleRate > 0)) {
    throw invalid('bad-option', `an NPY recording needs a positive sampleRate in Hz (got ${String(sampleRate)})`);
  }
  const item = Number(code.slice(1));
  const expected = samples * channels * item;
  const actual = size - h.dataOffset;
  if (actual < expected) {
    throw invalid(
      'truncated',
      `NPY header says shape (${samples}, ${channels}) of ${code === 'f4' ? 'float32' : 'float64'}, ${expected} bytes of data, but the file holds ${actual}; the file is cut short`,
    );
  }
  if (actual > expected) {
    throw invalid(
      'shape-mismatch',
      `NPY file holds ${actual} bytes of data after the header; shape (${samples}, ${channels}) needs ${expected}`,
    );
  }
  const little = h.descr[0] !== '>';
  return {
    channels,
    sampleRate,
    samplesPerChannel: samples,
    dataStart: h.dataOffset,
    bytesPerFrame: channels * item,
    decode: (buf, count, out, offset, first) => {
      const view = new DataView(buf.buffer, buf.byteOffset, buf.length);
      for (let c = 0; c < channels; c++) {
        const dst = out[c];
        for (let s = 0, o = c * item; s < count; s++, o += channels * item) {
          const v = item === 4 ? view.getFloat32(o, little) : view.getFloat64(o, little);
          if (!Number.isFinite(v)) {
            throw invalid(
              'not-finite',
              `NPY sample ${first + s + 1} of channel ${c + 1} is ${Number.isNaN(v) ? 'NaN' : 'infinite'}; all samples must be finite`,
              { row: first + s + 1, column: c + 1 },
            );
          }
          dst[offset + s] = v;
        }
      }
    },
    details: { kind: 'npy', dtype: h.descr, shape: h.shape, sampleRate },
  };
}

/** Opens a stored recording as a SampleSource. Rejects with a DatasetError. */
export async function openTimeSeries(options: TimeSeriesOptions): Promise<TimeSeriesSource> {
  const format = formatOf(options);
  const size =
    typeof options.path === 'string'
      ? await checkedFileSize({ path: options.path, maxBytes: options.maxBytes })
      : checkedRangeSize(options.path.size, options.maxBytes);
  if (size === 0) throw invalid('empty-file', `the ${format.toUpperCase()} file is empty`);
  const layout =
    format === 'wav' ? await wavLayout(options.path, size) : await npyLayout(options.path, size, options.sampleRate);
  const source = options.path;
  const fh = typeof source === 'string' ? await fsp.open(source, 'r') : null;
  /** Fills piece[0, bytes) from file offset `start`; the count of bytes there were. */
  const readPiece = async (start: number, bytes: number): Promise<number> => {
    if (fh) return (await fh.read(piece, 0, bytes, start)).bytesRead;
    const got = await (source as ByteRanges).read(start, start + bytes);
    return got.copy(piece, 0, 0, Math.min(bytes, got.length));
  };
  const frame = layout.bytesPerFrame;
  const piece = Buffer.alloc(Math.max(frame, Math.floor(CHUNK_BYTES / frame) * frame));
  const perPiece = piece.length / frame;
  let position = 0; // samples handed out
  let closed = false;
  return {
    format,
    details: layout.details,
    channels: layout.channels,
    sampleRate: layout.sampleRate,
    samplesPerChannel: layout.samplesPerChannel,
    async read(out, offset, count) {
      if (closed) throw new Error('the recording is closed');
      const want = Math.max(0, Math.min(count, layout.samplesPerChannel - position));
      let done = 0;
      while (done < want) {
        const n = Math.min(perPiece, want - done);
        const bytes = n * frame;
        const bytesRead = await readPiece(layout.dataStart + position * frame, bytes);
        if (bytesRead < bytes) {
          throw invalid(
            'truncated',
            `the ${format.toUpperCase()} data ended after ${position + Math.floor(bytesRead / frame)} of ${layout.samplesPerChannel} samples per channel; the file is cut short`,
          );
        }
        layout.decode(piece, n, out, offset + done, position);
        position += n;
        done += n;
      }
      return done;
    },
    async seek(sample) {
      if (!Number.isInteger(sample) || sample < 0 || sample > layout.samplesPerChannel) {
        throw new RangeError(`seek: sample ${sample} lies outside 0 … ${layout.samplesPerChannel}`);
      }
      position = sample;
    },
    async close() {
      if (closed) return;
      closed = true;
      await fh?.close();
    },
  };
}
