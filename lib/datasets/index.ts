/**
 * Snapshot-file readers (docs/conventions.md §6) behind one entry point.
 *
 * `parseSnapshotFile` reads a stored upload and returns N snapshots of M
 * elements in row-major split re/im layout, one snapshot per row exactly as
 * the file stores them; `toComplexMatrix` gives the engine's M × N layout.
 * Every refusal is a `DatasetError` with an HTTP status (413/415/422, or 500
 * when the file cannot be opened), a stable code and a message that names
 * what is wrong and where. Any other failure inside a reader is wrapped as a
 * 422 'corrupt' DatasetError, so callers see only DatasetError (or the abort
 * reason when `signal` fires).
 *
 * No React, Next or database imports: Node built-ins and the parsing
 * packages only.
 */
import type { ComplexMatrix } from '../doa/linalg/complex';
import { parseCsvFile } from './csv';
import { DatasetError, invalid, quoteText } from './errors';
import { parseHdf5File } from './hdf5';
import { checkedFileSize } from './io';
import { parseNpyFile } from './npy';
import type { ParseOptions, ParsedSnapshots, SnapshotFormat } from './types';
import { parseWavFile } from './wav';

export * from './types';
export { DatasetError } from './errors';
export type { DatasetErrorCode, DatasetErrorLocation, DatasetErrorStatus } from './errors';
export { sha256File, Sha256PassThrough } from './sha256';

/** Accepted file-name extensions and their formats. */
export const SNAPSHOT_EXTENSIONS: Readonly<Record<string, SnapshotFormat>> = {
  '.csv': 'csv',
  '.txt': 'csv',
  '.npy': 'npy',
  '.h5': 'hdf5',
  '.hdf5': 'hdf5',
  '.wav': 'wav',
};

/** The format for a file name by its extension (case-insensitive); 415 DatasetError if unknown. */
export function detectFormat(fileName: string): SnapshotFormat {
  const m = /(\.[A-Za-z0-9]+)$/.exec(fileName.trim());
  const ext = m ? m[1].toLowerCase() : '';
  const format = SNAPSHOT_EXTENSIONS[ext];
  if (!format) {
    throw new DatasetError(
      415,
      'unsupported-format',
      `${quoteText(fileName, 80)} is not a supported snapshot file: use .csv, .txt, .npy, .h5, .hdf5 or .wav`,
    );
  }
  return format;
}

/**
 * Reads a snapshot file. Resolves with the snapshots, or rejects with a
 * DatasetError (or the abort reason if `options.signal` fires).
 */
export async function parseSnapshotFile(options: ParseOptions): Promise<ParsedSnapshots> {
  const format = options.format ?? detectFormat(options.fileName ?? options.path);
  if (!['csv', 'npy', 'hdf5', 'wav'].includes(format)) {
    throw new DatasetError(
      415,
      'unsupported-format',
      `format ${quoteText(String(format))} is not supported: use csv, npy, hdf5 or wav`,
    );
  }
  const size = await checkedFileSize(options);
  try {
    switch (format) {
      case 'csv':
        return await parseCsvFile(options, size);
      case 'npy':
        return await parseNpyFile(options, size);
      case 'hdf5':
        return await parseHdf5File(options, size);
      case 'wav':
        return await parseWavFile(options, size);
    }
  } catch (error) {
    if (error instanceof DatasetError) throw error;
    if (options.signal?.aborted && error === options.signal.reason) throw error;
    if (error instanceof RangeError && /allocation|Invalid (typed )?array length/i.test(error.message)) {
      throw new DatasetError(413, 'file-too-large', 'the data are too large to hold in memory');
    }
    const detail = error instanceof Error ? error.message : String(error);
    throw invalid(
      'corrupt',
      `the ${format.toUpperCase()} file could not be read: ${quoteText(detail, 120).slice(1, -1)}`,
    );
  }
  throw new DatasetError(415, 'unsupported-format', `format ${quoteText(String(format))} is not supported`);
}

/**
 * The engine's layout of the same data: an M × N ComplexMatrix (elements ×
 * snapshots, row-major split re/im, docs/conventions.md §2). Copies; the input is not changed.
 */
export function toComplexMatrix(parsed: Pick<ParsedSnapshots, 'elements' | 'snapshots' | 're' | 'im'>): ComplexMatrix {
  const M = parsed.elements;
  const N = parsed.snapshots;
  if (parsed.re.length !== M * N || parsed.im.length !== M * N) {
    throw new RangeError(
      `toComplexMatrix: re/im hold ${parsed.re.length}/${parsed.im.length} values, expected ${N} × ${M} = ${N * M}`,
    );
  }
  const re = new Float64Array(M * N);
  const im = new Float64Array(M * N);
  for (let n = 0; n < N; n++) {
    const row = n * M;
    for (let m = 0; m < M; m++) {
      re[m * N + n] = parsed.re[row + m];
      im[m * N + n] = parsed.im[row + m];
    }
  }
  return { rows: M, cols: N, re, im };
}
