import 'server-only';
import fs from 'node:fs';
import path from 'node:path';
import { createHash, randomUUID } from 'node:crypto';
import { EstimateRun } from '@/models';
import type { ComplexMatrix } from '../doa';
import { dataDir } from '../env';
import { resolveStoragePath } from './files';
import { ensureLocalFile, publishStoredFile } from './shared';

/**
 * Inline snapshot sets stored once, by content, beside the datasets:
 *
 *   snapshots/<first two hex digits>/<sha256>.c128
 *
 * The file holds the N·M real parts, then the N·M imaginary parts, float64
 * little-endian, row-major with one snapshot per row (docs/conventions.md §2);
 * the SHA-256 is that of these bytes. A run refers to its set by
 * `inputs.snapshotSet`, so posting the same snapshots again adds no bytes to
 * the database and no file. Files are written to `<name>.part` and renamed.
 */
export interface SnapshotSetRef {
  sha256: string;
  rows: number;
  cols: number;
  /** Relative to the data folder. */
  path: string;
}

export function snapshotsDir(): string {
  return path.join(dataDir(), 'snapshots');
}

function bytesOf(m: ComplexMatrix): Buffer {
  const n = m.rows * m.cols;
  const all = new Float64Array(2 * n);
  all.set(m.re.subarray(0, n), 0);
  all.set(m.im.subarray(0, n), n);
  // Float64Array is little-endian on every platform Node supports in practice (x64, arm64).
  return Buffer.from(all.buffer, all.byteOffset, all.byteLength);
}

/** A set's bytes and reference, before its file is written (hashing is synchronous; nothing touches the disk). */
export interface PreparedSnapshotSet {
  ref: SnapshotSetRef;
  bytes: Buffer;
}

export function prepareSnapshotSet(m: ComplexMatrix): PreparedSnapshotSet {
  const bytes = bytesOf(m);
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  const rel = path.join('snapshots', sha256.slice(0, 2), `${sha256}.c128`);
  return { ref: { sha256, rows: m.rows, cols: m.cols, path: rel }, bytes };
}

/** Writes a prepared set's file unless a file of that content is already there. */
export async function writePreparedSnapshotSet({ ref, bytes }: PreparedSnapshotSet): Promise<SnapshotSetRef> {
  const file = resolveStoragePath(ref.path);
  if (!fs.existsSync(file)) {
    await fs.promises.mkdir(path.dirname(file), { recursive: true });
    const temp = `${file}.${randomUUID()}.part`;
    await fs.promises.writeFile(temp, bytes, { flag: 'wx' });
    await fs.promises.rename(temp, file);
    await publishStoredFile(ref.path);
  }
  return ref;
}

export async function storeSnapshotSet(m: ComplexMatrix): Promise<SnapshotSetRef> {
  return writePreparedSnapshotSet(prepareSnapshotSet(m));
}

/** Reads a stored set back, checking its SHA-256 (null when missing or changed). */
export async function readSnapshotSet(ref: SnapshotSetRef): Promise<ComplexMatrix | null> {
  let bytes: Buffer;
  try {
    bytes = await fs.promises.readFile(await ensureLocalFile(ref.path));
  } catch {
    return null;
  }
  const n = ref.rows * ref.cols;
  if (bytes.byteLength !== 16 * n || createHash('sha256').update(bytes).digest('hex') !== ref.sha256) return null;
  const all = new Float64Array(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength));
  return { rows: ref.rows, cols: ref.cols, re: all.slice(0, n), im: all.slice(n) };
}

/** The request form of a matrix: {re, im}, N rows of M numbers. */
export function nestedSnapshots(m: ComplexMatrix): { re: number[][]; im: number[][] } {
  const re: number[][] = [];
  const im: number[][] = [];
  for (let r = 0; r < m.rows; r++) {
    re.push(Array.from(m.re.subarray(r * m.cols, (r + 1) * m.cols)));
    im.push(Array.from(m.im.subarray(r * m.cols, (r + 1) * m.cols)));
  }
  return { re, im };
}

/**
 * A run's stored inputs with the snapshot set put back inline as
 * `request.snapshots` (the form bundles carry), or unchanged when the run has
 * no set. Throws when the stored file is missing or no longer matches.
 */
export async function withInlineSnapshots(inputs: Record<string, unknown>): Promise<Record<string, unknown>> {
  const ref = inputs.snapshotSet as SnapshotSetRef | undefined;
  if (!ref) return inputs;
  const m = await readSnapshotSet(ref);
  if (!m) throw new Error(`the stored snapshot set ${ref.sha256.slice(0, 12)}… is missing or changed`);
  const { snapshotSet: _ref, ...rest } = inputs;
  void _ref;
  return { ...rest, request: { ...(rest.request as Record<string, unknown>), snapshots: nestedSnapshots(m) } };
}

/** Whether any run refers to the stored set at `relative` (the start-up sweep keeps only those). */
export async function isSnapshotSetReferenced(relative: string): Promise<boolean> {
  const sha = path.basename(relative).split('.')[0];
  if (!/^[0-9a-f]{64}$/.test(sha)) return false;
  // A JSON path query on both databases: json_extract on SQLite, ->> on the JSONB column on Postgres.
  return (await EstimateRun.count({ where: { inputs: { snapshotSet: { sha256: sha } } } as never })) > 0;
}
