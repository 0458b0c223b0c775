/**
 * HDF5 snapshot reader (docs/conventions.md §6) on h5wasm (the HDF5 C library compiled
 * to WebAssembly; its Node build reads the host file system directly).
 *
 * Dataset choice: the named `datasetPath`; without one, the only dataset of
 * rank 2 (or rank 3 with a trailing dimension of 2) in the file. Several such
 * datasets need a name (422 'ambiguous-dataset'), none is 422 'no-2d-dataset'.
 *
 * Value layouts, shape (N, M) with one snapshot per row:
 * - a compound of two float members named r/i or real/imag (any case, either order);
 * - float32/float64 data of shape (N, M, 2), last axis = (real, imaginary);
 * - float32/float64 data of shape (N, M): real values, imaginary parts zero.
 * Integer, string and other datatypes are refused with 415.
 *
 * Memory: the dataset is read in blocks of rows with h5wasm's slice(), so the
 * JavaScript side never holds more than about a million values (a quarter of
 * that for compounds) besides the output.
 * The h5wasm calls are synchronous and block the event loop while they run;
 * the web layer should call this from a worker for large files.
 * HDF5's own diagnostic printout on failure is muted while h5wasm runs.
 */
import fs from 'node:fs';
import { DatasetError, invalid, quoteText, unsupported } from './errors';
import { checkValueCount, progressReporter, throwIfAborted } from './io';
import type { ParseOptions, ParsedSnapshots } from './types';

type H5Module = typeof import('h5wasm/node');
type H5File = InstanceType<H5Module['File']>;
type H5Dataset = InstanceType<H5Module['Dataset']>;
type H5Metadata = H5Dataset['metadata'];

const H5T_INTEGER = 0;
const H5T_FLOAT = 1;
const H5T_COMPOUND = 6;
const MAX_OBJECTS = 10000;
const BLOCK_VALUES = 1 << 20;

let modulePromise: Promise<H5Module> | null = null;

/** Loads h5wasm once per process. */
async function loadH5wasm(): Promise<H5Module> {
  if (!modulePromise) {
    modulePromise = (async () => {
      const mod = await import('h5wasm/node');
      await mod.ready;
      return mod;
    })();
    modulePromise.catch(() => {
      modulePromise = null;
    });
  }
  return modulePromise;
}

/**
 * Runs a synchronous h5wasm call with HDF5's diagnostics captured instead of
 * printed. HDF5 prints its error stack with fprintf(stderr), which the Node
 * build of h5wasm turns into fs.writeSync(2, …); both that and
 * process.stderr.write are diverted for the duration of the (synchronous) call.
 */
function muted<T>(fn: () => T): { value?: T; error?: unknown; diagnostics: string } {
  const originalWrite = process.stderr.write;
  const originalWriteSync = fs.writeSync;
  let diagnostics = '';
  const keep = (chunk: unknown): void => {
    if (diagnostics.length >= 20000) return;
    if (typeof chunk === 'string') diagnostics += chunk;
    else if (ArrayBuffer.isView(chunk))
      diagnostics += Buffer.from(chunk.buffer, chunk.byteOffset, chunk.byteLength).toString('utf8');
  };
  process.stderr.write = ((chunk: string | Uint8Array) => {
    keep(chunk);
    return true;
  }) as typeof process.stderr.write;
  fs.writeSync = ((fd: number, buffer: unknown, ...rest: unknown[]) => {
    if (fd !== 2) return (originalWriteSync as (...a: unknown[]) => number)(fd, buffer, ...rest);
    if (typeof buffer === 'string') {
      keep(buffer);
      return Buffer.byteLength(buffer);
    }
    if (!ArrayBuffer.isView(buffer)) return 0;
    const bytes = new Uint8Array(buffer.buffer, buffer.byteOffset, buffer.byteLength);
    const offset = typeof rest[0] === 'number' ? rest[0] : 0;
    const length = typeof rest[1] === 'number' ? rest[1] : bytes.byteLength - offset;
    keep(bytes.subarray(offset, offset + length));
    return length;
  }) as typeof fs.writeSync;
  try {
    return { value: fn(), diagnostics };
  } catch (error) {
    return { error, diagnostics };
  } finally {
    process.stderr.write = originalWrite;
    fs.writeSync = originalWriteSync;
  }
}

/** The last "minor:" reason HDF5 printed, e.g. 'Not an HDF5 file', for messages. */
function hdf5Reason(diagnostics: string, error?: unknown): string {
  const minors = [...diagnostics.matchAll(/minor: ([^\n]+)/g)].map((m) => m[1].trim());
  const last = minors.length ? minors[minors.length - 1] : '';
  if (last) return last;
  if (error instanceof Error && error.message) return error.message.slice(0, 120);
  return 'unreadable';
}

function call<T>(what: string, fn: () => T): T {
  const r = muted(fn);
  if (r.error !== undefined) {
    if (r.error instanceof DatasetError) throw r.error;
    throw invalid('corrupt', `HDF5 file could not be read: ${what} failed (${hdf5Reason(r.diagnostics, r.error)})`);
  }
  return r.value as T;
}

type Layout =
  | { kind: 'compound'; reIndex: number; imIndex: number; fields: [string, string] }
  | { kind: 'trailing-2' }
  | { kind: 'real' }
  | { kind: 'unsupported'; status: 415 | 422; reason: string };

function describeType(meta: H5Metadata): string {
  switch (meta.type) {
    case H5T_INTEGER:
      return `${meta.signed ? '' : 'unsigned '}${meta.size * 8}-bit integers`;
    case H5T_FLOAT:
      return `${meta.size * 8}-bit floats`;
    case H5T_COMPOUND:
      return `a compound of (${(meta.compound_type?.members ?? []).map((m) => m.name).join(', ')})`;
    case 3:
      return 'strings';
    default:
      return `HDF5 type class ${meta.type}`;
  }
}

function classify(meta: H5Metadata): Layout {
  const shape = meta.shape ?? [];
  if (meta.type === H5T_FLOAT) {
    if (meta.size !== 4 && meta.size !== 8) {
      return { kind: 'unsupported', status: 415, reason: `holds ${meta.size * 8}-bit floats; use float32 or float64` };
    }
    if (shape.length === 3 && shape[2] === 2) return { kind: 'trailing-2' };
    if (shape.length === 2) return { kind: 'real' };
    return {
      kind: 'unsupported',
      status: 422,
      reason: `has shape (${shape.join(', ')}); snapshots need (N, M), or (N, M, 2) for real and imaginary parts`,
    };
  }
  if (meta.type === H5T_COMPOUND) {
    const members = meta.compound_type?.members ?? [];
    const names = members.map((m) => m.name.toLowerCase());
    for (const [a, b] of [
      ['r', 'i'],
      ['real', 'imag'],
    ]) {
      const reIndex = names.indexOf(a);
      const imIndex = names.indexOf(b);
      if (members.length === 2 && reIndex >= 0 && imIndex >= 0) {
        const ok = [members[reIndex], members[imIndex]].every(
          (m) => m.type === H5T_FLOAT && (m.size === 4 || m.size === 8),
        );
        if (!ok) {
          return { kind: 'unsupported', status: 415, reason: 'is a compound whose members are not float32 or float64' };
        }
        if (shape.length !== 2) {
          return { kind: 'unsupported', status: 422, reason: `has shape (${shape.join(', ')}); snapshots need (N, M)` };
        }
        return { kind: 'compound', reIndex, imIndex, fields: [members[reIndex].name, members[imIndex].name] };
      }
    }
    return {
      kind: 'unsupported',
      status: 415,
      reason: `is ${describeType(meta)}; a complex compound needs exactly two float members named r/i or real/imag`,
    };
  }
  return {
    kind: 'unsupported',
    status: 415,
    reason: `holds ${describeType(meta)}; use float32/float64, a compound of two floats named r/i or real/imag, or floats with a trailing dimension of 2`,
  };
}

/** Rank as a snapshot matrix: rank 3 with trailing 2 counts as 2. */
function logicalRank(meta: H5Metadata): number {
  const shape = meta.shape ?? [];
  if (meta.type === H5T_FLOAT && shape.length === 3 && shape[2] === 2) return 2;
  return shape.length;
}

function listDatasets(file: H5File): { path: string; dataset: H5Dataset; meta: H5Metadata }[] {
  const paths = call('listing the objects', () => file.paths());
  if (paths.length > MAX_OBJECTS) {
    throw invalid(
      'corrupt',
      `HDF5 file has ${paths.length} objects; name the dataset with datasetPath (the automatic search stops at ${MAX_OBJECTS})`,
    );
  }
  const out: { path: string; dataset: H5Dataset; meta: H5Metadata }[] = [];
  for (const p of paths) {
    const entity = muted(() => file.get(p)).value;
    if (entity && (entity as { type?: string }).type === 'Dataset') {
      const dataset = entity as H5Dataset;
      const meta = muted(() => dataset.metadata).value;
      if (meta) out.push({ path: p.startsWith('/') ? p : `/${p}`, dataset, meta });
    }
  }
  return out;
}

function summary(items: { path: string; meta: H5Metadata }[]): string {
  const shown = items
    .slice(0, 8)
    .map((d) => `${d.path} (${(d.meta.shape ?? []).join('×') || 'scalar'}, ${describeType(d.meta)})`);
  return shown.join('; ') + (items.length > 8 ? `; and ${items.length - 8} more` : '');
}

export async function parseHdf5File(options: ParseOptions, fileSize: number): Promise<ParsedSnapshots> {
  if (fileSize === 0) throw invalid('empty-file', 'the HDF5 file is empty');
  const h5 = await loadH5wasm();
  throwIfAborted(options.signal);
  const opened = muted(() => new h5.File(options.path, 'r'));
  const file = opened.value;
  if (!file || opened.error !== undefined || file.file_id < BigInt(0)) {
    const reason = hdf5Reason(opened.diagnostics, opened.error);
    throw invalid(/truncated/i.test(reason) ? 'truncated' : 'corrupt', `not a readable HDF5 file (${reason})`);
  }
  try {
    return readFromFile(h5, file, options, fileSize);
  } finally {
    muted(() => file.close());
  }
}

function readFromFile(h5: H5Module, file: H5File, options: ParseOptions, fileSize: number): ParsedSnapshots {
  let dataset: H5Dataset;
  let meta: H5Metadata;
  let datasetPath: string;
  const guessed = options.datasetPath === undefined || options.datasetPath.trim() === '';
  if (!guessed) {
    datasetPath = options.datasetPath!.trim();
    if (!datasetPath.startsWith('/')) datasetPath = `/${datasetPath}`;
    const entity = muted(() => file.get(datasetPath)).value ?? null;
    if (!entity || (entity as { type?: string }).type !== 'Dataset') {
      const all = listDatasets(file);
      const what = entity
        ? `is a ${(entity as { type?: string }).type ?? 'non-dataset object'}, not a dataset`
        : 'was not found';
      throw invalid(
        'dataset-not-found',
        `HDF5 dataset ${quoteText(datasetPath, 200)} ${what}; datasets in the file: ${all.length ? summary(all) : 'none'}`,
      );
    }
    dataset = entity as H5Dataset;
    meta = call(`reading the type of ${datasetPath}`, () => dataset.metadata);
  } else {
    const all = listDatasets(file);
    const candidates = all.filter((d) => logicalRank(d.meta) === 2);
    if (candidates.length === 0) {
      throw invalid(
        'no-2d-dataset',
        `HDF5 file has no 2-D dataset to read snapshots from; datasets in the file: ${all.length ? summary(all) : 'none'}`,
      );
    }
    if (candidates.length > 1) {
      throw invalid(
        'ambiguous-dataset',
        `HDF5 file has ${candidates.length} 2-D datasets (${candidates
          .map((c) => c.path)
          .slice(0, 8)
          .join(', ')}); name one with datasetPath`,
      );
    }
    ({ dataset, meta, path: datasetPath } = candidates[0]);
  }

  const layout = classify(meta);
  if (layout.kind === 'unsupported') {
    const message = `HDF5 dataset ${quoteText(datasetPath, 200)} ${layout.reason}`;
    throw layout.status === 415 ? unsupported('unsupported-dtype', message) : invalid('bad-shape', message);
  }
  const shape = meta.shape!;
  const snapshots = shape[0];
  const elements = shape[1];
  if (snapshots === 0 || elements === 0)
    throw invalid('no-snapshots', `HDF5 dataset ${quoteText(datasetPath, 200)} is empty (shape ${shape.join('×')})`);
  if (elements < 2) {
    throw invalid(
      'too-few-elements',
      `HDF5 dataset ${quoteText(datasetPath, 200)} has 1 column; an array needs at least 2 elements`,
    );
  }
  checkValueCount(snapshots, elements, options);

  const re = new Float64Array(snapshots * elements);
  const im = new Float64Array(snapshots * elements);
  const report = progressReporter(options, fileSize);
  // compounds come back as one small JS array per value, so read them in smaller blocks
  const blockValues = layout.kind === 'compound' ? BLOCK_VALUES / 4 : BLOCK_VALUES;
  const blockRows = Math.max(1, Math.floor(blockValues / elements));
  for (let r0 = 0; r0 < snapshots; r0 += blockRows) {
    throwIfAborted(options.signal);
    const r1 = Math.min(snapshots, r0 + blockRows);
    const ranges: [number, number][] =
      layout.kind === 'trailing-2'
        ? [
            [r0, r1],
            [0, elements],
            [0, 2],
          ]
        : [
            [r0, r1],
            [0, elements],
          ];
    const block = call(`reading rows ${r0 + 1}–${r1} of ${datasetPath}`, () => dataset.slice(ranges));
    const base = r0 * elements;
    const count = (r1 - r0) * elements;
    if (layout.kind === 'compound') {
      if (!Array.isArray(block) || block.length !== count) {
        throw invalid(
          'corrupt',
          `HDF5 dataset ${quoteText(datasetPath, 200)}: rows ${r0 + 1}–${r1} could not be read as compounds`,
        );
      }
      for (let q = 0; q < count; q++) {
        const rec = block[q] as unknown;
        if (!Array.isArray(rec))
          throw invalid('corrupt', `HDF5 dataset ${quoteText(datasetPath, 200)}: a compound value could not be read`);
        re[base + q] = Number(rec[layout.reIndex]);
        im[base + q] = Number(rec[layout.imIndex]);
      }
    } else {
      const values = block as ArrayLike<number>;
      const want = layout.kind === 'trailing-2' ? 2 * count : count;
      if (!values || typeof values !== 'object' || values.length !== want) {
        throw invalid('corrupt', `HDF5 dataset ${quoteText(datasetPath, 200)}: rows ${r0 + 1}–${r1} could not be read`);
      }
      if (layout.kind === 'trailing-2') {
        for (let q = 0; q < count; q++) {
          re[base + q] = values[2 * q];
          im[base + q] = values[2 * q + 1];
        }
      } else {
        for (let q = 0; q < count; q++) re[base + q] = values[q];
      }
    }
    for (let q = 0; q < count; q++) {
      if (!Number.isFinite(re[base + q]) || !Number.isFinite(im[base + q])) {
        const n = r0 + Math.floor(q / elements);
        const m = q % elements;
        throw invalid(
          'not-finite',
          `HDF5 dataset ${quoteText(datasetPath, 200)}: the value at snapshot row ${n + 1}, column ${m + 1} is not finite`,
          { row: n + 1, column: m + 1 },
        );
      }
    }
    report(Math.round((fileSize * r1) / snapshots));
  }
  report(fileSize, true);
  void h5;
  return {
    format: 'hdf5',
    elements,
    snapshots,
    re,
    im,
    details: {
      kind: 'hdf5',
      datasetPath,
      storage: layout.kind,
      ...(layout.kind === 'compound' ? { fields: layout.fields } : {}),
      guessed,
    },
  };
}
