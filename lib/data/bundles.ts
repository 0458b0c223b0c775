import 'server-only';
/**
 * The database side of hand-off bundles: what an export reads (an array
 * revision with its sign-offs, chosen runs and datasets, all within the
 * caller's team) and what an import writes (a new array, its datasets and
 * runs, in one transaction with the files renamed into place). The bundle
 * format is lib/bundle; building and checking a bundle is lib/handoff.
 */
import fs from 'node:fs';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { Op } from 'sequelize';
import { ArrayDesign, ArrayRevision, Dataset, EstimateRun, Review, Team, User } from '@/models';
import { ApiError } from '../http';
import { assertPermission, type Caller } from '../auth';
import { getDb } from '../db';
import { recordAudit } from './record-audit';
import type { BundleManifest } from '../bundle/bundle';
import type { BundleDatasetJson, BundleRevisionJson, BundleRunJson } from '../bundle/contents';
import { remapRunInputs, storedResults, type RunComparison } from '../handoff/runs';
import { removeQuietly, resolveStoragePath } from '../storage/files';

export interface BundleSelection {
  /** Revision number; default the latest. */
  revision?: number;
  datasetIds?: number[];
  runIds?: number[];
}

const iso = (d: Date | string) => new Date(d).toISOString();

/** Whether this caller may put dataset files into a bundle (viewers only when the team allows it). */
export async function mayExportDatasets(caller: Caller): Promise<boolean> {
  if (caller.role !== 'viewer') return true;
  const team = await Team.findByPk(caller.teamId);
  return Boolean(team?.settings.allowViewerDatasetExport);
}

/** The records an export of one array revision draws on. */
export interface ArrayBundleSources {
  array: ArrayDesign;
  rev: ArrayRevision;
  runs: EstimateRun[];
  datasets: Dataset[];
  author: User | null;
  signOffs: BundleRevisionJson['signOffs'];
  datasetsAllowed: boolean;
}

/**
 * Reads what a bundle of one array revision holds, checking team ownership of
 * everything chosen: 404 for another team's (or a missing) array, revision,
 * run or dataset; 403 when the caller may not export dataset files; 422 for a
 * run that is unfinished or used another revision. Runs bring their datasets
 * along when the caller may export data.
 */
export async function loadArrayBundleSources({
  caller,
  arrayId,
  selection = {},
}: {
  caller: Caller;
  arrayId: number;
  selection?: BundleSelection;
}): Promise<ArrayBundleSources> {
  assertPermission(caller, 'arrays.read');
  await getDb();
  const array = await ArrayDesign.findOne({ where: { id: arrayId, teamId: caller.teamId } });
  if (!array) throw new ApiError('not_found', `No array with id ${arrayId} in your team.`);
  const revisionNumber = selection.revision ?? array.latestRevision;
  const rev = await ArrayRevision.findOne({ where: { arrayId: array.id, revision: revisionNumber } });
  if (!rev)
    throw new ApiError(
      'not_found',
      `Array "${array.name}" has no revision ${revisionNumber} (latest is ${array.latestRevision}).`,
      { fields: { revision: [`no revision ${revisionNumber}`] } },
    );

  const datasetIds = [...new Set(selection.datasetIds ?? [])];
  const runIds = [...new Set(selection.runIds ?? [])];
  const datasetsAllowed = await mayExportDatasets(caller);
  if (datasetIds.length && !datasetsAllowed) {
    throw new ApiError(
      'forbidden',
      'Your role (viewer) cannot export dataset files in this team: an admin can allow it in the team settings. Export without datasets instead.',
    );
  }

  const runs = runIds.length
    ? await EstimateRun.findAll({ where: { id: { [Op.in]: runIds }, teamId: caller.teamId } })
    : [];
  for (const id of runIds)
    if (!runs.some((r) => r.id === id))
      throw new ApiError('not_found', `No estimate run with id ${id} in your team.`, {
        fields: { runs: [`no run ${id}`] },
      });
  for (const r of runs) {
    if (r.status !== 'done')
      throw new ApiError(
        'validation_failed',
        `Estimate run ${r.id} is ${r.status}; only finished runs go into a bundle.`,
        { fields: { runs: [`run ${r.id} is ${r.status}`] } },
      );
    if (r.arrayRevisionId !== rev.id) {
      const used = r.arrayRevisionId ? await ArrayRevision.findByPk(r.arrayRevisionId as number) : null;
      const what = used
        ? used.arrayId === array.id
          ? `revision ${used.revision} of this array`
          : 'another array'
        : 'an inline array';
      throw new ApiError(
        'validation_failed',
        `Estimate run ${r.id} used ${what}, not revision ${rev.revision}; export the revision it used.`,
        { fields: { runs: [`run ${r.id} used ${what}`] } },
      );
    }
  }
  const wanted = new Set(datasetIds);
  if (datasetsAllowed) for (const r of runs) if (r.datasetId) wanted.add(r.datasetId as number);
  const datasets = wanted.size
    ? await Dataset.findAll({ where: { id: { [Op.in]: [...wanted] }, teamId: caller.teamId }, order: [['id', 'ASC']] })
    : [];
  for (const id of datasetIds)
    if (!datasets.some((d) => d.id === id))
      throw new ApiError('not_found', `No dataset with id ${id} in your team.`, {
        fields: { datasets: [`no dataset ${id}`] },
      });

  const author = rev.authorId ? await User.findByPk(rev.authorId as number) : null;
  const approvals = await Review.findAll({
    where: { teamId: caller.teamId, arrayRevisionId: rev.id, kind: 'approval' },
    order: [['createdAt', 'ASC']],
  });
  const approvers = await User.findAll({
    where: { id: { [Op.in]: approvals.map((a) => a.authorId as number).filter(Boolean) } },
  });
  const signOffs = approvals.map((a) => ({
    by: approvers.find((u) => u.id === a.authorId)?.name ?? 'a former member',
    at: iso(a.createdAt),
    note: a.body,
  }));
  return { array, rev, runs, datasets, author, signOffs, datasetsAllowed };
}

/** A finished run of the revision that the export panel offers to include. */
export type HandoffRunChoice = { id: number; label: string; datasetName: string | null };

/**
 * What the hand-off panels of one array revision show: the array's name, its
 * latest 20 finished runs (with their methods and dataset names) and whether
 * the caller may export dataset files. null when the team has no such array
 * revision.
 */
export async function getArrayHandoffPanel({
  caller,
  arrayId,
  revision,
}: {
  caller: Caller;
  arrayId: number;
  revision: number;
}): Promise<{ arrayName: string; runs: HandoffRunChoice[]; datasetsAllowed: boolean } | null> {
  assertPermission(caller, 'arrays.read');
  await getDb();
  const array = await ArrayDesign.findOne({ where: { id: arrayId, teamId: caller.teamId } });
  const rev = array ? await ArrayRevision.findOne({ where: { arrayId, revision } }) : null;
  if (!array || !rev) return null;
  const runs = await EstimateRun.findAll({
    where: { teamId: caller.teamId, arrayRevisionId: rev.id, status: 'done' },
    order: [['id', 'DESC']],
    limit: 20,
  });
  const datasets = await Dataset.findAll({
    where: { id: { [Op.in]: runs.map((r) => r.datasetId as number).filter(Boolean) }, teamId: caller.teamId },
    attributes: ['id', 'name'],
  });
  const choices = runs.map((r) => {
    let methods = '';
    try {
      methods = storedResults(r.result)
        .map((m) => m.method)
        .join(', ');
    } catch {
      methods = 'result not readable';
    }
    return {
      id: r.id,
      label: `Run ${r.id} (${methods})`,
      datasetName: datasets.find((d) => d.id === r.datasetId)?.name ?? null,
    };
  });
  return { arrayName: array.name, runs: choices, datasetsAllowed: await mayExportDatasets(caller) };
}

export interface ImportedRun {
  id: number;
  originalId: number;
  /** null when the bundle held no data to re-run it with. */
  reproduced: boolean | null;
  comparison: RunComparison | null;
  note?: string;
}

/** The answer of POST /api/v1/bundles. */
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

/** A checked dataset of a bundle, its data already in a temp file. */
export interface CheckedBundleDataset {
  /** Its folder inside the bundle (datasets/<id>). */
  folder: string;
  meta: BundleDatasetJson;
  /** The temp file holding its data (renamed into place here; the caller removes it if still there). */
  temp: string;
}

/** A checked run of a bundle and the outcome of re-executing it. */
export interface CheckedBundleRun {
  json: BundleRunJson;
  dataset: CheckedBundleDataset | null;
  comparison: RunComparison | null;
  note?: string;
}

/**
 * Writes a checked bundle into the caller's team in one transaction: a NEW
 * array (revision 1, same config), its datasets (files renamed from their
 * temp paths into datasets/<team>/ inside the transaction) and its runs (with
 * the new ids), and the bundle.imported audit entry. On failure no row
 * remains and files already renamed are removed.
 */
export async function storeImportedBundle({
  caller,
  manifest,
  bundleSha256,
  arrayName,
  revision,
  datasets,
  runs,
}: {
  caller: Caller;
  manifest: BundleManifest;
  bundleSha256: string;
  /** The name from the validated config. */
  arrayName: string;
  revision: BundleRevisionJson;
  datasets: CheckedBundleDataset[];
  runs: CheckedBundleRun[];
}): Promise<ImportResult> {
  assertPermission(caller, 'arrays.edit');
  assertPermission(caller, 'datasets.upload');
  const db = await getDb();
  const moved: string[] = [];
  try {
    return await db.transaction(async (transaction) => {
      const array = await ArrayDesign.create(
        { teamId: caller.teamId, name: arrayName, latestRevision: 1, createdById: caller.id },
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
            bundleSha256,
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
  } catch (err) {
    for (const f of moved) await removeQuietly(f);
    throw err;
  }
}
