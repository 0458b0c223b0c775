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
import type { z } from 'zod';
import { ApiError } from '@/lib/http';
import { receiveFile } from '@/lib/http/multipart';
import { assertPermission, type Caller } from '@/lib/auth';
import {
  storeImportedBundle,
  type CheckedBundleDataset,
  type CheckedBundleRun,
  type ImportResult,
} from '@/lib/data/bundles';
import { maxBundleBytes } from '@/lib/env';
import { BundleError, readBundle, sha256Hex } from '@/lib/bundle/bundle';
import {
  REVISION_PATH,
  bundleDatasetOptionsSchema,
  bundleDatasetSchema,
  bundleRevisionSchema,
  bundleRunSchema,
} from '@/lib/bundle/contents';
import { DatasetError, parseSnapshotFile, type SnapshotFormat } from '@/lib/datasets';
import type { ComplexMatrix } from '@/lib/doa';
import { arrayInputSchema, resolveArrayGeometry } from '@/lib/validations/array';
import { inlineSnapshots, reproduceRun, type RunComparison } from './runs';
import { newTempPath, removeQuietly } from '@/lib/storage/files';

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

/** Reads, checks and imports a bundle. Throws ApiError (413/415/422) on refusal with nothing written. */
export async function importBundle({ caller, bytes }: { caller: Caller; bytes: Uint8Array }): Promise<ImportResult> {
  assertPermission(caller, 'arrays.edit');
  assertPermission(caller, 'datasets.upload');

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
  const revision = parseJsonFile(files, REVISION_PATH, bundleRevisionSchema);
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
  try {
    // Datasets: re-hash, write to a temp file, re-parse and compare the shape.
    const datasetEntries = manifest.files.filter((f) => f.kind === 'dataset' && f.path.endsWith('/dataset.json'));
    const datasets: (CheckedBundleDataset & { rows: ComplexMatrix })[] = [];
    for (const entry of datasetEntries) {
      const meta = parseJsonFile(files, entry.path, bundleDatasetSchema);
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
      const options = bundleDatasetOptionsSchema.safeParse(meta.options ?? {});
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
    const runs: CheckedBundleRun[] = [];
    for (const entry of runEntries) {
      const json = parseJsonFile(files, entry.path, bundleRunSchema);
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

    return await storeImportedBundle({
      caller,
      manifest,
      bundleSha256: sha256Hex(bytes),
      arrayName: config.data.name,
      revision,
      datasets,
      runs,
    });
  } finally {
    for (const t of temps) await removeQuietly(t);
  }
}
