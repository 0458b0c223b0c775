/** Small file helpers shared by the readers: size checks, progress, abort. */
import { promises as fsp } from 'node:fs';
import { DatasetError } from './errors';
import type { ParseOptions, ParseProgress } from './types';
import { DEFAULT_MAX_BYTES, DEFAULT_MAX_VALUES } from './types';

export const CHUNK_BYTES = 1024 * 1024;

/**
 * Bytes that are not a local file: a stored object read by ranges (lib/storage/shared.ts,
 * `storedBytes`). `read(start, end)` gives bytes [start, end), fewer only at the end.
 * The header readers (wav.ts, npy.ts) and the time-series reader take either a path or this,
 * so a process that needs a recording's header or a few blocks fetches only those bytes.
 */
export interface ByteRanges {
  size: number;
  read(start: number, end: number): Promise<Buffer>;
}

/** A local file's path, or a source of byte ranges. */
export type ByteSource = string | ByteRanges;

/** Up to `length` bytes from `start` (fewer at the end of the file). */
export async function readBytes(source: ByteSource, start: number, length: number): Promise<Buffer> {
  if (typeof source !== 'string') return source.read(start, start + length);
  const fh = await fsp.open(source, 'r');
  try {
    const buf = Buffer.alloc(length);
    const { bytesRead } = await fh.read(buf, 0, length, start);
    return buf.subarray(0, bytesRead);
  } finally {
    await fh.close();
  }
}

/** A stored object's size, with the same 413 as checkedFileSize. */
export function checkedRangeSize(size: number, maxBytes = DEFAULT_MAX_BYTES): number {
  if (size > maxBytes) {
    throw new DatasetError(
      413,
      'file-too-large',
      `the file is ${formatBytes(size)}; the limit is ${formatBytes(maxBytes)}`,
    );
  }
  return size;
}

/** Size of the file; 413 when it exceeds maxBytes. */
export async function checkedFileSize(options: ParseOptions): Promise<number> {
  const maxBytes = options.maxBytes ?? DEFAULT_MAX_BYTES;
  let size: number;
  try {
    const stat = await fsp.stat(options.path);
    if (!stat.isFile()) throw new Error('not a regular file');
    size = stat.size;
  } catch (error) {
    throw new DatasetError(500, 'io-error', `the uploaded file could not be read (${(error as Error).message})`);
  }
  return checkedRangeSize(size, maxBytes);
}

/** 413 when N·M exceeds maxValues (bounds the 16 bytes per value of the output). */
export function checkValueCount(snapshots: number, elements: number, options: ParseOptions): void {
  const maxValues = options.maxValues ?? DEFAULT_MAX_VALUES;
  if (snapshots * elements > maxValues) {
    throw new DatasetError(
      413,
      'file-too-large',
      `the data has ${snapshots} snapshots × ${elements} elements = ${snapshots * elements} values; the limit is ${maxValues}`,
    );
  }
}

export function formatBytes(n: number): string {
  if (n < 1024) return `${n} bytes`;
  if (n < 1024 * 1024) return `${(n / 1024).toFixed(1)} KiB`;
  return `${(n / (1024 * 1024)).toFixed(1)} MiB`;
}

export function throwIfAborted(signal: AbortSignal | undefined): void {
  if (signal?.aborted) throw signal.reason ?? new Error('aborted');
}

/** Returns a reporter that calls onProgress at most once per MiB (and always at the end). */
export function progressReporter(
  options: ParseOptions,
  totalBytes: number,
): (bytesRead: number, final?: boolean) => void {
  const cb = options.onProgress;
  if (!cb) return () => {};
  let last = -Infinity;
  return (bytesRead, final = false) => {
    if (final || bytesRead - last >= CHUNK_BYTES) {
      last = bytesRead;
      const p: ParseProgress = { bytesRead, totalBytes };
      cb(p);
    }
  };
}
