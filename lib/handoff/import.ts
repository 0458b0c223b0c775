import 'server-only';
/**
 * Importing a hand-off bundle into the caller's team.
 *
 * Everything is checked before anything is written: the archive (lib/bundle:
 * entry count, sizes, compression ratio, paths, symlinks, duplicates, schema
 * version, manifest, SHA-256 of every file), the array revision (zod, the
 * same schema as the designer and the arrays API), each dataset (re-hashed
 * and re-parsed, its shape compared with its metadata) and each run
 * (re-executed with lib/doa and compared with its stored bearings). Then one
 * transaction creates a NEW array (revision 1, same config), its datasets
 * (files renamed into the data folder inside the transaction) and its runs.
 * On any refusal or failure no row and no file remains.
 */
import fs from 'node:fs';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { z } from 'zod';
import { ArrayDesign, ArrayRevision, Dataset, EstimateRun } from '@/models';
import { ApiError } from '@/lib/http';
import { receiveFile } from '@/lib/http/multipart';
import { assertPermission, type Caller } from '@/lib/auth';
import { recordAudit } from '@/lib/data/record-audit';
import { getDb } from '@/lib/db';
import { maxBundleBytes } from '@/lib/env';
import { BundleError, readBundle, sha256Hex, type BundleManifest } from '@/lib/bundle/bundle';
import { DatasetError, parseSnapshotFile, type SnapshotFormat } from '@/lib/datasets';
import type { ComplexMatrix } from '@/lib/doa';
import { arrayInputSchema, resolveArrayGeometry } from '@/lib/validations/array';
import { REVISION_PATH } from './export';
import { inlineSnapshots, reproduceRun, type RunComparison } from './runs';
import { newTempPath, removeQuietly, resolveStoragePath } from '@/lib/storage/files';

/**
 * Reads the multipart `file` of POST /api/v1/bundles under
 * STEERWISE_MAX_BUNDLE_BYTES (lib/http/multipart.ts) and returns its bytes:
 * a bundle is checked and read whole, so the temp file is removed at once.
 */
export async function receiveBundle(
  req: Request,
  maxBytes = maxBundleBytes(),
): Promise<{ bytes: Uint8Array; fileName: string; sha256: string }> {
  const upload = await receiveFile(req, {
    noun: 'bundle',
    maxBytes,
    maxFields: 10,
    tooLarge: (limit) =>
      new ApiError('too_large', `The bundle is larger than the limit of ${limit} bytes (STEERWISE_MAX_BUNDLE_BYTES).`, {
        fields: { file: [`larger than ${limit} bytes`] },
      }),
    missingFile: 'No file: send the bundle in a multipart field named "file".',
  });
  try {
    const bytes = new Uint8Array(await fs.promises.readFile(upload.tempPath));
    return { bytes, fileName: upload.originalName, sha256: upload.sha256 };
  } finally {
    await removeQuietly(upload.tempPath);
  }
}

const revisionJsonSchema = z.object({
  format: z.literal('steerwise-array-revision', { error: 'format must be "steerwise-array-revision"' }),
  name: z.string().min(1).max(120),
  revision: z.number().int().min(1),
  createdAt: z.string(),
  author: z.object({ name: z.string(), email: z.string() }).nullable(),
  elements: z.number().int(),
  spacingWavelengths: z.number().positive(),
  frequencyHz: z.number().positive().nullable(),
  propagationSpeedMps: z.number().positive().nullable(),
  config: z.record(z.string(), z.unknown()),
  signOffs: z
    .array(z.object({ by: z.string(), at: z.string(), note: z.string() }))
    .max(100)
    .default([]),
});

const datasetJsonSchema = z.object({
  format: z.literal('steerwise-dataset', { error: 'format must be "steerwise-dataset"' }),
  originalId: z.number().int(),
  name: z.string().min(1).max(200),
  fileFormat: z.enum(['csv', 'npy', 'hdf5', 'wav']),
  elements: z.number().int().min(2),
  snapshots: z.number().int().min(1),
  sha256: z.string().regex(/^[0-9a-f]{64}$/),
  bytes: z.number().int().nonnegative(),
  originalName: z.string().min(1).max(255),
  options: z.record(z.string(), z.unknown()).nullable(),
  createdAt: z.string(),
  file: z.string().min(1),
});

const runJsonSchema = z.object({
  format: z.literal('steerwise-estimate-run', { error: 'format must be "steerwise-estimate-run"' }),
  originalId: z.number().int(),
  createdAt: z.string(),
  softwareVersion: z.string().max(40),
  datasetSha256: z.string().nullable(),
  dataset: z.string().nullable(),
  inputs: z.record(z.string(), z.unknown()),
  result: z.record(z.string(), z.unknown()),
});

/** What a bundle file may set as parse options of its dataset (the rest is ignored). */
const datasetOptionsSchema = z
  .object({
    datasetPath: z.string().max(400).optional(),
    frequencyHz: z.number().positive().optional(),
    fftLength: z.number().int().min(2).max(65536).optional(),
    hop: z.number().int().min(1).optional(),
    window: z.enum(['hann', 'hamming', 'rectangular']).optional(),
  })
  .partial();

function refuse(message: string, where?: string): never {
  throw new ApiError('validation_failed', where ? `${where}: ${message}` : message, {
    fields: { file: [where ? `${where}: ${message}` : message] },
  });
}

function parseJsonFile<T extends z.ZodType>(files: Map<string, Uint8Array>, p: string, schema: T): z.infer<T> {
  const bytes = files.get(p);
  if (!bytes) refuse('missing from the bundle', p);
  let raw: unknown;
  try {
    raw = JSON.parse(new TextDecoder('utf-8', { fatal: true }).decode(bytes));
  } catch {
    refuse('is not valid UTF-8 JSON', p);
  }
  const parsed = schema.safeParse(raw);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    refuse(`${issue.path.join('.') || '(root)'}: ${issue.message}`, p);
  }
  return parsed.data;
}

/** The run's inputs with the ids of the source team replaced by the new records' ids. */
export function remapRunInputs(
  inputs: Record<string, unknown>,
  ids: { datasetId: number | null; arrayId: number; arrayRevisionId: number },
): Record<string, unknown> {
  const out: Record<string, unknown> = JSON.parse(JSON.stringify(inputs));
  const fix = (o: Record<string, unknown> | undefined) => {
    if (!o || typeof o !== 'object') return;
    if ('datasetId' in o) o.datasetId = ids.datasetId ?? undefined;
    if ('arrayId' in o) o.arrayId = ids.arrayId;
    if ('arrayRevisionId' in o) o.arrayRevisionId = ids.arrayRevisionId;
    if ('revision' in o && 'arrayRevisionId' in o) o.revision = 1;
  };
  fix(out);
  fix(out.request as Record<string, unknown>);
  fix(out.array as Record<string, unknown>);
  const ds = out.dataset as Record<string, unknown> | undefined;
  if (ds && typeof ds === 'object') {
    if (ids.datasetId === null) delete out.dataset;
    else ds.id = ids.datasetId;
  }
  return JSON.parse(JSON.stringify(out));
}

export interface ImportedRun {
  id: number;
  originalId: number;
  /** null when the bundle held no data to re-run it with. */
  reproduced: boolean | null;
  comparison: RunComparison | null;
  note?: string;
}

export interface ImportResult {
  arrayId: number;
  name: string;
  revision: number;
  sourceRevision: number;
  bundle: {
    title: string;
    author: BundleManifest['author'];
    createdAt: string;
    softwareVersion: string;
    files: number;
  };
  datasets: { id: number; originalId: number; name: string; sha256: string }[];
  runs: ImportedRun[];
  /** true when every included run was re-executed and reproduced; null when there were no runs to re-run. */
  reproduced: boolean | null;
  signOffsInSource: { by: string; at: string; note: string }[];
}

/** Reads, checks and imports a bundle. Throws ApiError (413/415/422) on refusal with nothing written. */
export async function importBundle({ caller, bytes }: { caller: Caller; bytes: Uint8Array }): Promise<ImportResult> {
  assertPermission(caller, 'arrays.edit');
  assertPermission(caller, 'datasets.upload');
  const db = await getDb();

  let bundle: ReturnType<typeof readBundle>;
  try {
    bundle = readBundle(bytes);
  } catch (err) {
    if (err instanceof BundleError) {
      const notZip = err.code === 'archive' && /not a zip|too short to be a zip/.test(err.message);
      throw new ApiError(
        notZip ? 'unsupported_format' : 'validation_failed',
        `The bundle was refused: ${err.message}.`,
        { fields: { file: [`${err.code}: ${err.message}`] } },
      );
    }
    throw err;
  }
  const { manifest, files } = bundle;

  // The array revision.
  if (!manifest.files.some((f) => f.path === REVISION_PATH && f.kind === 'array-revision'))
    refuse(`the manifest lists no ${REVISION_PATH} of kind "array-revision"`);
  const revision = parseJsonFile(files, REVISION_PATH, revisionJsonSchema);
  const config = arrayInputSchema.safeParse(revision.config);
  if (!config.success) {
    const issue = config.error.issues[0];
    refuse(`config is not a valid array: ${issue.message}`, REVISION_PATH);
  }
  const geometry = resolveArrayGeometry(config.data);
  if (config.data.elements !== revision.elements)
    refuse(`elements is ${revision.elements} but config.elements is ${config.data.elements}`, REVISION_PATH);
  if (Math.abs(geometry.spacingWavelengths - revision.spacingWavelengths) > 1e-12 * revision.spacingWavelengths) {
    refuse(
      `spacingWavelengths ${revision.spacingWavelengths} does not follow from the config (${geometry.spacingWavelengths})`,
      REVISION_PATH,
    );
  }

  const temps: string[] = [];
  const moved: string[] = [];
  try {
    // Datasets: re-hash, write to a temp file, re-parse and compare the shape.
    const datasetEntries = manifest.files.filter((f) => f.kind === 'dataset' && f.path.endsWith('/dataset.json'));
    const datasets: { folder: string; meta: z.infer<typeof datasetJsonSchema>; temp: string; rows: ComplexMatrix }[] =
      [];
    for (const entry of datasetEntries) {
      const meta = parseJsonFile(files, entry.path, datasetJsonSchema);
      const folder = entry.path.slice(0, -'/dataset.json'.length);
      if (!meta.file.startsWith(`${folder}/`))
        refuse(`file '${meta.file}' lies outside its folder ${folder}/`, entry.path);
      const data = files.get(meta.file);
      if (!data || !manifest.files.some((f) => f.path === meta.file && f.kind === 'dataset'))
        refuse(`its data file '${meta.file}' is not in the bundle`, entry.path);
      const digest = sha256Hex(data);
      if (digest !== meta.sha256 || data.byteLength !== meta.bytes)
        refuse(
          `the data file's SHA-256 ${digest.slice(0, 12)}… (${data.byteLength} bytes) does not match the metadata's ${meta.sha256.slice(0, 12)}… (${meta.bytes} bytes)`,
          entry.path,
        );
      if (meta.elements !== config.data.elements)
        refuse(`the dataset has ${meta.elements} elements but the array has ${config.data.elements}`, entry.path);
      const options = datasetOptionsSchema.safeParse(meta.options ?? {});
      if (!options.success) refuse(`options: ${options.error.issues[0].message}`, entry.path);
      const temp = await newTempPath(`${path.extname(meta.file).toLowerCase()}.part`);
      temps.push(temp);
      await fs.promises.writeFile(temp, data, { flag: 'wx' });
      let parsed;
      try {
        parsed = await parseSnapshotFile({
          path: temp,
          format: meta.fileFormat as SnapshotFormat,
          fileName: meta.originalName,
          maxBytes: Math.max(meta.bytes, 1),
          ...options.data,
        });
      } catch (err) {
        if (err instanceof DatasetError) refuse(`the data file does not parse: ${err.message}`, meta.file);
        throw err;
      }
      if (parsed.elements !== meta.elements || parsed.snapshots !== meta.snapshots) {
        refuse(
          `the file holds ${parsed.snapshots} snapshots of ${parsed.elements} elements; the metadata says ${meta.snapshots} of ${meta.elements}`,
          meta.file,
        );
      }
      datasets.push({
        folder,
        meta,
        temp,
        rows: { rows: parsed.snapshots, cols: parsed.elements, re: parsed.re, im: parsed.im },
      });
    }

    // Runs: check references, then re-execute.
    const runEntries = manifest.files.filter((f) => f.kind === 'estimate-run');
    const runs: {
      json: z.infer<typeof runJsonSchema>;
      dataset: (typeof datasets)[number] | null;
      comparison: RunComparison | null;
      note?: string;
    }[] = [];
    for (const entry of runEntries) {
      const json = parseJsonFile(files, entry.path, runJsonSchema);
      let dataset: (typeof datasets)[number] | null = null;
      if (json.dataset !== null) {
        dataset = datasets.find((d) => d.folder === json.dataset) ?? null;
        if (!dataset) refuse(`it refers to ${json.dataset}, which the bundle does not hold`, entry.path);
        if (json.datasetSha256 && json.datasetSha256 !== dataset.meta.sha256)
          refuse(`its datasetSha256 does not match ${json.dataset}`, entry.path);
      }
      let rows = dataset?.rows ?? null;
      let note: string | undefined;
      if (!rows) {
        try {
          rows = inlineSnapshots(json.inputs);
        } catch (err) {
          refuse(`inputs.snapshots: ${(err as Error).message}`, entry.path);
        }
      }
      if (rows && rows.cols !== config.data.elements)
        refuse(`its data has ${rows.cols} elements but the array has ${config.data.elements}`, entry.path);
      const runArray = (json.inputs.array ?? null) as { elements?: unknown; spacingWavelengths?: unknown } | null;
      if (
        runArray &&
        typeof runArray.spacingWavelengths === 'number' &&
        Math.abs(runArray.spacingWavelengths - geometry.spacingWavelengths) > 1e-12 * geometry.spacingWavelengths
      ) {
        refuse(
          `the run used a spacing of ${runArray.spacingWavelengths} λ, not this array's ${geometry.spacingWavelengths} λ`,
          entry.path,
        );
      }
      let comparison: RunComparison | null = null;
      if (rows)
        comparison = reproduceRun({
          rows,
          spacingWavelengths: geometry.spacingWavelengths,
          inputs: json.inputs,
          result: json.result,
        });
      else note = 'not re-run: the bundle holds no data for this run (its datasets were left out)';
      runs.push({ json, dataset, comparison, note });
    }

    // Write everything in one transaction; files are renamed into place inside it.
    const created = await db.transaction(async (transaction) => {
      const array = await ArrayDesign.create(
        { teamId: caller.teamId, name: config.data.name, latestRevision: 1, createdById: caller.id },
        { transaction },
      );
      const rev = await ArrayRevision.create(
        {
          arrayId: array.id,
          revision: 1,
          authorId: caller.id,
          config: revision.config,
          elements: revision.elements,
          spacingWavelengths: revision.spacingWavelengths,
          frequencyHz: revision.frequencyHz,
          propagationSpeedMps: revision.propagationSpeedMps,
        },
        { transaction },
      );
      const datasetIds = new Map<string, number>();
      const datasetOut: ImportResult['datasets'] = [];
      for (const d of datasets) {
        const rel = path.join(
          'datasets',
          String(caller.teamId),
          `${randomUUID()}${path.extname(d.meta.file).toLowerCase()}`,
        );
        const row = await Dataset.create(
          {
            teamId: caller.teamId,
            name: d.meta.name,
            format: d.meta.fileFormat,
            elements: d.meta.elements,
            snapshots: d.meta.snapshots,
            sha256: d.meta.sha256,
            bytes: d.meta.bytes,
            originalName: d.meta.originalName,
            storagePath: rel,
            arrayId: array.id,
            options: d.meta.options,
            details: { importedFrom: { bundle: manifest.title, originalId: d.meta.originalId } },
            uploadedById: caller.id,
          },
          { transaction },
        );
        const finalPath = resolveStoragePath(rel);
        await fs.promises.mkdir(path.dirname(finalPath), { recursive: true });
        await fs.promises.rename(d.temp, finalPath);
        moved.push(finalPath);
        datasetIds.set(d.folder, row.id);
        datasetOut.push({ id: row.id, originalId: d.meta.originalId, name: row.name, sha256: row.sha256 });
      }
      const runOut: ImportedRun[] = [];
      for (const r of runs) {
        const datasetId = r.dataset ? (datasetIds.get(r.dataset.folder) ?? null) : null;
        const inputs = remapRunInputs(r.json.inputs, { datasetId, arrayId: array.id, arrayRevisionId: rev.id });
        const row = await EstimateRun.create(
          {
            teamId: caller.teamId,
            status: 'done',
            progress: 1,
            datasetId,
            datasetSha256: r.json.datasetSha256,
            arrayRevisionId: rev.id,
            inputs,
            result: r.json.result,
            softwareVersion: r.json.softwareVersion,
            createdById: caller.id,
          },
          { transaction },
        );
        runOut.push({
          id: row.id,
          originalId: r.json.originalId,
          reproduced: r.comparison ? r.comparison.reproduced : null,
          comparison: r.comparison,
          note: r.note,
        });
      }
      const rerun = runOut.filter((r) => r.reproduced !== null);
      const result: ImportResult = {
        arrayId: array.id,
        name: array.name,
        revision: 1,
        sourceRevision: revision.revision,
        bundle: {
          title: manifest.title,
          author: manifest.author,
          createdAt: manifest.createdAt,
          softwareVersion: manifest.softwareVersion,
          files: manifest.files.length,
        },
        datasets: datasetOut,
        runs: runOut,
        reproduced: rerun.length ? rerun.every((r) => r.reproduced) : null,
        signOffsInSource: revision.signOffs,
      };
      await recordAudit(
        {
          teamId: caller.teamId,
          userId: caller.id,
          action: 'bundle.imported',
          target: array.name,
          detail: {
            arrayId: array.id,
            bundle: manifest.title,
            from: manifest.author.email,
            bundleSha256: sha256Hex(bytes),
            datasets: datasetOut.map((d) => d.id),
            runs: runOut.map((r) => ({
              id: r.id,
              originalId: r.originalId,
              reproduced: r.reproduced,
              maxAbsDifferenceDeg: r.comparison?.methods.map((m) => m.maxAbsDifferenceDeg) ?? null,
            })),
          },
        },
        transaction,
      );
      return result;
    });
    return created;
  } catch (err) {
    for (const f of moved) await removeQuietly(f);
    throw err;
  } finally {
    for (const t of temps) await removeQuietly(t);
  }
}
