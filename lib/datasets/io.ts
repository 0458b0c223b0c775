/** Small file helpers shared by the readers: size checks, progress, abort. */
import { promises as fsp } from 'node:fs';
import { DatasetError } from './errors';
import type { ParseOptions, ParseProgress } from './types';
import { DEFAULT_MAX_BYTES, DEFAULT_MAX_VALUES } from './types';

export const CHUNK_BYTES = 1024 * 1024;

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
  if (size > maxBytes) {
    throw new DatasetError(
      413,
      'file-too-large',
      `the file is ${formatBytes(size)}; the limit is ${formatBytes(maxBytes)}`,
    );
  }
  return size;
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
