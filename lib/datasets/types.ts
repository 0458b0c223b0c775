/**
 * Shared types of the snapshot-file readers.
 *
 * Layout of a parsed file: `re` and `im` are Float64Arrays of length N·M in
 * row-major order with one snapshot per row, exactly as the files store them
 * (docs/conventions.md §6): entry (n, m) — snapshot n, element m, both 0-based — is at
 * index n·M + m. `toComplexMatrix` turns this into the engine's M × N layout.
 */
export type SnapshotFormat = 'csv' | 'npy' | 'hdf5' | 'wav';

export type StftWindow = 'hann' | 'hamming' | 'rectangular';

export interface ParseProgress {
  /** Bytes of the file consumed so far. */
  bytesRead: number;
  /** File size in bytes. */
  totalBytes: number;
}

export interface ParseOptions {
  /** Path of the file on disk (the stored upload). */
  path: string;
  /** Format; when absent it follows from the extension of `fileName` (or `path`). */
  format?: SnapshotFormat;
  /** The name the user gave the file; used for the extension and in messages. */
  fileName?: string;
  /** HDF5: path of the dataset inside the file. */
  datasetPath?: string;
  /** WAV: analysis frequency in Hz (required for WAV). */
  frequencyHz?: number;
  /** WAV: FFT length, a power of two from 2 to 65536. Default 1024. */
  fftLength?: number;
  /** WAV: hop between frame starts in samples, ≥ 1. Default = fftLength. */
  hop?: number;
  /** WAV: analysis window. Default 'hann' (periodic). */
  window?: StftWindow;
  /** Largest accepted file in bytes (413 above it). Default 200 MiB. */
  maxBytes?: number;
  /** Largest accepted N·M (413 above it); bounds the output memory (16 bytes per value). Default 2^25. */
  maxValues?: number;
  /** CSV: longest accepted line in characters (422 above it). Default 1 MiB. */
  maxLineLength?: number;
  /** Called as the file is read, at most about once per MiB. */
  onProgress?: (progress: ParseProgress) => void;
  /** Stops the parse; the promise then rejects with the signal's reason. */
  signal?: AbortSignal;
}

export interface CsvDetails {
  kind: 'csv';
  /** Column names from the header row, or null when there is none. */
  header: string[] | null;
  /** Number of lines starting with '#'. */
  commentLines: number;
  /** Number of physical lines in the file. */
  lines: number;
}

export interface NpyDetails {
  kind: 'npy';
  /** NPY format version, e.g. '1.0'. */
  version: string;
  /** dtype descriptor as written in the header, e.g. '<c16'. */
  dtype: string;
  fortranOrder: boolean;
  /** Shape as written in the header: [N, M] or [M]. */
  shape: number[];
}

export interface Hdf5Details {
  kind: 'hdf5';
  /** Absolute path of the dataset that was read. */
  datasetPath: string;
  /** How the complex values were stored. */
  storage: 'compound' | 'trailing-2' | 'real';
  /** Compound field names used for the real and imaginary parts (compound storage only). */
  fields?: [string, string];
  /** Whether the dataset was picked automatically (no datasetPath given). */
  guessed: boolean;
}

export interface WavDetails {
  kind: 'wav';
  channels: number;
  sampleRate: number;
  bitsPerSample: number;
  sampleFormat: 'pcm' | 'float';
  extensible: boolean;
  samplesPerChannel: number;
  frequencyHz: number;
  fftLength: number;
  hop: number;
  window: StftWindow;
  /** FFT bin k = round(f·L/fs). */
  bin: number;
  /** Centre frequency of that bin, k·fs/L, in Hz. */
  binFrequencyHz: number;
}

export type ParseDetails = CsvDetails | NpyDetails | Hdf5Details | WavDetails;

export interface ParsedSnapshots {
  format: SnapshotFormat;
  /** M, the number of array elements (columns). */
  elements: number;
  /** N, the number of snapshots (rows). */
  snapshots: number;
  /** Real parts, N·M, row-major, one snapshot per row. */
  re: Float64Array;
  /** Imaginary parts, same layout (zeros for real-valued files). */
  im: Float64Array;
  /** WAV only: sample rate in Hz. */
  sampleRate?: number;
  details: ParseDetails;
}

export const DEFAULT_MAX_BYTES = 200 * 1024 * 1024;
export const DEFAULT_MAX_VALUES = 2 ** 25;
export const DEFAULT_MAX_LINE_LENGTH = 1024 * 1024;
export const DEFAULT_FFT_LENGTH = 1024;
