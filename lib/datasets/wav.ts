/**
 * WAV snapshot reader (docs/conventions.md §6): multichannel PCM 16/24/32-bit or
 * 32-bit float, plain or WAVE_FORMAT_EXTENSIBLE header, RIFF (little-endian)
 * or RIFX (big-endian). Channel c is element c. Snapshots come from the
 * narrowband STFT in stft.ts.
 *
 * The header is parsed by the wavefile package from the first bytes of the
 * file (64 KiB, grown up to 16 MiB if other chunks come before 'data'), with
 * sample loading off; only the offset of the data chunk is located here (see
 * findDataChunk). The data chunk is then streamed from disk in 1 MiB pieces, so memory stays O(M·L) besides the output, whatever the file size.
 * Samples are scaled to [−1, 1): integer PCM is divided by 2^(bits−1), float
 * is taken as is (the scale does not move bearings).
 *
 * Refused with 415: 8-bit PCM (unsigned, and not in §6), 64-bit float,
 * compressed encodings (ADPCM, A-law, µ-law …), RF64.
 * Refused with 422: fewer than 2 channels, an empty or truncated data chunk,
 * a missing, non-positive or above-Nyquist frequency, fewer samples than one
 * FFT length, a bad FFT length, hop or window, non-finite float samples.
 */
import { createReadStream } from 'node:fs';
import { WaveFile } from 'wavefile';
import { invalid, quoteText, unsupported } from './errors';
import { CHUNK_BYTES, checkValueCount, progressReporter, readBytes, throwIfAborted, type ByteSource } from './io';
import { NarrowbandStft, stftBin, stftFrameCount } from './stft';
import type { ParseOptions, ParsedSnapshots, StftWindow } from './types';
import { DEFAULT_FFT_LENGTH } from './types';

const WAVE_FORMAT_PCM = 1;
const WAVE_FORMAT_IEEE_FLOAT = 3;
const WAVE_FORMAT_EXTENSIBLE = 0xfffe;
const FIRST_PREFIX = 64 * 1024;
const MAX_PREFIX = 16 * 1024 * 1024;

interface FmtChunk {
  audioFormat: number;
  numChannels: number;
  sampleRate: number;
  blockAlign: number;
  bitsPerSample: number;
  subformat?: number[];
}

interface WavHeader {
  container: string;
  fmt: FmtChunk;
  dataStart: number;
  dataSize: number;
}

async function readPrefix(source: ByteSource, length: number): Promise<Uint8Array> {
  const buf = await readBytes(source, 0, length);
  return new Uint8Array(buf.buffer, buf.byteOffset, buf.length);
}

/** Parses the header with wavefile from a growing prefix of the file. */
async function readWavHeader(source: ByteSource, fileSize: number): Promise<WavHeader> {
  let length = Math.min(fileSize, FIRST_PREFIX);
  for (;;) {
    const prefix = await readPrefix(source, length);
    if (prefix.length >= 4) {
      const tag = String.fromCharCode(prefix[0], prefix[1], prefix[2], prefix[3]);
      if (tag === 'RF64')
        throw unsupported('unsupported-format', 'RF64 WAV files are not supported: use a RIFF WAV file');
      if (tag !== 'RIFF' && tag !== 'RIFX') {
        throw invalid('bad-magic', "not a WAV file: it does not start with 'RIFF'");
      }
    }
    const wav = new WaveFile();
    let failure: unknown = null;
    try {
      wav.fromBuffer(prefix, false);
    } catch (error) {
      failure = error;
    }
    const dataChunk = failure ? null : findDataChunk(wav, prefix);
    if (!failure && dataChunk) {
      return {
        container: wav.container,
        fmt: wav.fmt as FmtChunk,
        dataStart: dataChunk.start,
        dataSize: dataChunk.size,
      };
    }
    if (length >= fileSize || length >= MAX_PREFIX) {
      const reason = failure instanceof Error ? failure.message : 'no "data" chunk';
      if (prefix.length < 12) throw invalid('truncated', `the WAV file is cut short: ${prefix.length} bytes`);
      throw invalid('corrupt', `the WAV header could not be read: ${quoteText(reason, 80).slice(1, -1)}`);
    }
    length = Math.min(fileSize, length * 8, MAX_PREFIX);
  }
}

/**
 * Offset and size of the 'data' chunk. wavefile parses and checks the header
 * but does not expose where the data chunk starts (its internal chunk index
 * is renamed in the published build), so the chunk directory is walked here:
 * 4-byte id, 4-byte size, bodies padded to even length (RIFF rule). The size
 * must agree with what wavefile read.
 */
function findDataChunk(wav: WaveFile, prefix: Uint8Array): { start: number; size: number } | null {
  const view = new DataView(prefix.buffer, prefix.byteOffset, prefix.length);
  const little = wav.container !== 'RIFX';
  let i = 12;
  while (i + 8 <= prefix.length) {
    const id = String.fromCharCode(prefix[i], prefix[i + 1], prefix[i + 2], prefix[i + 3]);
    const size = view.getUint32(i + 4, little);
    if (id === 'data') {
      const expected = (wav.data as { chunkSize?: number }).chunkSize;
      return expected === size ? { start: i + 8, size } : null;
    }
    i += 8 + size + (size % 2);
  }
  return null;
}

function checkOptions(options: ParseOptions): {
  fftLength: number;
  hop: number;
  window: StftWindow;
  frequencyHz: number;
} {
  const fftLength = options.fftLength ?? DEFAULT_FFT_LENGTH;
  if (!Number.isInteger(fftLength) || fftLength < 2 || fftLength > 65536 || (fftLength & (fftLength - 1)) !== 0) {
    throw invalid('bad-option', `FFT length ${String(fftLength)} is not allowed: use a power of two from 2 to 65536`);
  }
  const hop = options.hop ?? fftLength;
  if (!Number.isInteger(hop) || hop < 1 || hop > 1 << 24) {
    throw invalid('bad-option', `hop ${String(hop)} is not allowed: use a whole number of samples, at least 1`);
  }
  const window = options.window ?? 'hann';
  if (window !== 'hann' && window !== 'hamming' && window !== 'rectangular') {
    throw invalid('bad-option', `window ${quoteText(String(window))} is not known: use hann, hamming or rectangular`);
  }
  const frequencyHz = options.frequencyHz;
  if (frequencyHz === undefined || frequencyHz === null) {
    throw invalid('missing-frequency', 'a WAV file needs an analysis frequency (frequencyHz) to form snapshots');
  }
  if (typeof frequencyHz !== 'number' || !Number.isFinite(frequencyHz) || frequencyHz <= 0) {
    throw invalid(
      'bad-option',
      `analysis frequency ${String(frequencyHz)} Hz is not allowed: use a positive number of hertz`,
    );
  }
  return { fftLength, hop, window, frequencyHz };
}

/** Sample layout of a WAV file, from its header (no sample read yet). */
export interface WavLayout {
  container: string;
  channels: number;
  sampleRate: number;
  bitsPerSample: number;
  sampleFormat: 'pcm' | 'float';
  extensible: boolean;
  littleEndian: boolean;
  /** Bytes per multichannel sample (channels × bits/8). */
  blockAlign: number;
  /** Byte offset and declared size of the data chunk. */
  dataStart: number;
  dataSize: number;
  /** Whole multichannel samples in the declared data chunk. */
  samplesPerChannel: number;
}

/**
 * Reads and checks the header: sample format (415 for the encodings this
 * reader does not take), at least 2 channels, block align and sample rate.
 * The data chunk itself is checked by checkWavData.
 */
export async function readWavLayout(source: ByteSource, fileSize: number): Promise<WavLayout> {
  if (fileSize === 0) throw invalid('empty-file', 'the WAV file is empty');
  const header = await readWavHeader(source, fileSize);
  const fmt = header.fmt;
  const extensible = fmt.audioFormat === WAVE_FORMAT_EXTENSIBLE;
  const formatTag = extensible ? (fmt.subformat?.[0] ?? 0) : fmt.audioFormat;
  const bits = fmt.bitsPerSample;
  const channels = fmt.numChannels;
  let sampleFormat: 'pcm' | 'float';
  if (formatTag === WAVE_FORMAT_PCM && (bits === 16 || bits === 24 || bits === 32)) sampleFormat = 'pcm';
  else if (formatTag === WAVE_FORMAT_IEEE_FLOAT && bits === 32) sampleFormat = 'float';
  else if (formatTag === WAVE_FORMAT_PCM) {
    throw unsupported(
      'unsupported-sample-format',
      `WAV ${bits}-bit PCM is not supported: use 16-, 24- or 32-bit PCM or 32-bit float`,
    );
  } else if (formatTag === WAVE_FORMAT_IEEE_FLOAT) {
    throw unsupported(
      'unsupported-sample-format',
      `WAV ${bits}-bit float is not supported: use 16-, 24- or 32-bit PCM or 32-bit float`,
    );
  } else {
    throw unsupported(
      'unsupported-sample-format',
      `WAV encoding 0x${formatTag.toString(16).padStart(4, '0')} is not supported: use 16-, 24- or 32-bit PCM or 32-bit float`,
    );
  }
  if (!Number.isInteger(channels) || channels < 2) {
    throw invalid(
      'too-few-channels',
      `WAV has ${channels} channel${channels === 1 ? '' : 's'}; an array needs at least 2`,
    );
  }
  const bytesPerSample = bits / 8;
  const block = channels * bytesPerSample;
  if (fmt.blockAlign !== block) {
    throw invalid(
      'corrupt',
      `WAV block align is ${fmt.blockAlign} bytes; ${channels} channels of ${bits} bits need ${block}`,
    );
  }
  const sampleRate = fmt.sampleRate;
  if (!Number.isFinite(sampleRate) || sampleRate <= 0)
    throw invalid('corrupt', `WAV sample rate ${sampleRate} Hz is not valid`);
  return {
    container: header.container,
    channels,
    sampleRate,
    bitsPerSample: bits,
    sampleFormat,
    extensible,
    littleEndian: header.container !== 'RIFX',
    blockAlign: block,
    dataStart: header.dataStart,
    dataSize: header.dataSize,
    samplesPerChannel: Math.floor(header.dataSize / block),
  };
}

/** 422 when the data chunk is empty or runs past the end of the file. */
export function checkWavData(layout: WavLayout, fileSize: number): void {
  if (layout.dataSize === 0) throw invalid('no-snapshots', 'WAV has no samples: the data chunk is empty');
  const available = fileSize - layout.dataStart;
  if (layout.dataSize > available) {
    throw invalid(
      'truncated',
      `the WAV data chunk says ${layout.dataSize} bytes but only ${Math.max(0, available)} bytes follow; the file is cut short`,
    );
  }
}

/**
 * Decodes `count` whole multichannel samples from `buf` (interleaved, as
 * stored) into channel-major outputs: out[c][offset + s]. Integer PCM is
 * scaled by 1/2^(bits−1), float is taken as is. `firstSample` is the 0-based
 * index of the first decoded sample in the file, used in the message of a
 * non-finite float sample (422 'not-finite', 1-based sample and channel).
 */
export function decodeWavSamples(
  layout: WavLayout,
  buf: Buffer,
  count: number,
  out: (Float32Array | Float64Array)[],
  offset: number,
  firstSample: number,
): void {
  const channels = layout.channels;
  const bits = layout.bitsPerSample;
  const little = layout.littleEndian;
  const bytesPerSample = bits / 8;
  const block = layout.blockAlign;
  const view = new DataView(buf.buffer, buf.byteOffset, buf.length);
  if (layout.sampleFormat === 'float') {
    for (let c = 0; c < channels; c++) {
      const dst = out[c];
      for (let s = 0, o = c * 4; s < count; s++, o += block) {
        const v = view.getFloat32(o, little);
        if (!Number.isFinite(v)) {
          throw invalid(
            'not-finite',
            `WAV sample ${firstSample + s + 1} of channel ${c + 1} is ${Number.isNaN(v) ? 'NaN' : 'infinite'}; all samples must be finite`,
            { row: firstSample + s + 1, column: c + 1 },
          );
        }
        dst[offset + s] = v;
      }
    }
    return;
  }
  const scale = 1 / 2 ** (bits - 1);
  for (let c = 0; c < channels; c++) {
    const dst = out[c];
    let o = c * bytesPerSample;
    if (bits === 16) {
      for (let s = 0; s < count; s++, o += block) dst[offset + s] = view.getInt16(o, little) * scale;
    } else if (bits === 32) {
      for (let s = 0; s < count; s++, o += block) dst[offset + s] = view.getInt32(o, little) * scale;
    } else {
      for (let s = 0; s < count; s++, o += block) {
        const b0 = little ? buf[o] : buf[o + 2];
        const b2 = little ? buf[o + 2] : buf[o];
        dst[offset + s] = (((b2 << 24) >> 8) | (buf[o + 1] << 8) | b0) * scale; // sign-extended 24-bit
      }
    }
  }
}

export async function parseWavFile(options: ParseOptions, fileSize: number): Promise<ParsedSnapshots> {
  const layout = await readWavLayout(options.path, fileSize);
  const { channels, sampleRate, samplesPerChannel } = layout;
  const bits = layout.bitsPerSample;
  const opts = checkOptions(options);
  if (opts.frequencyHz > sampleRate / 2) {
    throw invalid(
      'frequency-above-nyquist',
      `analysis frequency ${opts.frequencyHz} Hz is above the Nyquist frequency ${sampleRate / 2} Hz of this ${sampleRate} Hz recording`,
    );
  }
  checkWavData(layout, fileSize);
  if (samplesPerChannel < opts.fftLength) {
    throw invalid(
      'too-few-samples',
      `WAV has ${samplesPerChannel} samples per channel; one frame needs ${opts.fftLength} (the FFT length)`,
    );
  }
  const frames = stftFrameCount(samplesPerChannel, opts.fftLength, opts.hop);
  checkValueCount(frames, channels, options);
  const bin = stftBin(opts.frequencyHz, opts.fftLength, sampleRate);
  const stft = new NarrowbandStft(channels, opts.fftLength, opts.hop, opts.window, bin, frames);

  const block = layout.blockAlign;
  const values = new Float64Array(channels);
  const decoded = Array.from({ length: channels }, () => new Float64Array(Math.ceil(CHUNK_BYTES / block) + 1));
  const report = progressReporter(options, fileSize);
  const usedBytes = samplesPerChannel * block;
  let leftover = Buffer.alloc(0);
  let sampleIndex = 0;
  let bytesRead = layout.dataStart;
  const stream = createReadStream(options.path, {
    start: layout.dataStart,
    end: layout.dataStart + usedBytes - 1,
    highWaterMark: CHUNK_BYTES,
  });
  try {
    for await (const piece of stream as AsyncIterable<Buffer>) {
      throwIfAborted(options.signal);
      bytesRead += piece.length;
      const buf = leftover.length ? Buffer.concat([leftover, piece]) : piece;
      const whole = Math.floor(buf.length / block);
      if (decoded[0].length < whole) {
        for (let c = 0; c < channels; c++) decoded[c] = new Float64Array(whole);
      }
      decodeWavSamples(layout, buf, whole, decoded, 0, sampleIndex);
      for (let s = 0; s < whole; s++, sampleIndex++) {
        for (let c = 0; c < channels; c++) values[c] = decoded[c][s];
        stft.push(values);
      }
      leftover = Buffer.from(buf.subarray(whole * block));
      report(bytesRead);
    }
  } finally {
    stream.destroy();
  }
  if (stft.frames !== frames) {
    throw invalid('truncated', `the WAV data ended after ${sampleIndex} of ${samplesPerChannel} samples per channel`);
  }
  report(bytesRead, true);
  return {
    format: 'wav',
    elements: channels,
    snapshots: frames,
    re: stft.re,
    im: stft.im,
    sampleRate,
    details: {
      kind: 'wav',
      channels,
      sampleRate,
      bitsPerSample: bits,
      sampleFormat: layout.sampleFormat,
      extensible: layout.extensible,
      samplesPerChannel,
      frequencyHz: opts.frequencyHz,
      fftLength: opts.fftLength,
      hop: opts.hop,
      window: opts.window,
      bin,
      binFrequencyHz: (bin * sampleRate) / opts.fftLength,
    },
  };
}
