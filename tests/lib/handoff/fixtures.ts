/**
 * Records for hand-off tests, written straight through the models (the
 * arrays/datasets/estimates routes belong to other features): an array with
 * one revision, a CSV dataset of seeded simulated snapshots stored under the
 * data folder, and a finished estimate run whose bearings were computed by
 * lib/doa estimateBearings on that data, stored in the layout
 * lib/data/estimates.ts uses ({request, methods, options, array, dataset};
 * result {results:[…]}).
 */
import fs from 'node:fs';
import path from 'node:path';
import { createHash, randomUUID } from 'node:crypto';
import { ArrayDesign, ArrayRevision, Dataset, EstimateRun, User } from '@/models';
import { dataDir } from '@/lib/env';
import { parseSnapshotFile } from '@/lib/datasets';
import { estimateBearings, simulateSnapshots, type DoaMethod } from '@/lib/doa';
import { arrayInputSchema, resolveArrayGeometry, type ArrayInputRaw } from '@/lib/validations/array';

export const baseConfig: ArrayInputRaw = {
  name: 'Port Alder inshore line',
  elements: 8,
  spacing: { value: 0.125, unit: 'm' },
  frequencyHz: 6000,
  medium: { kind: 'sea-water', temperatureC: 12, salinityPpt: 35, depthM: 20, equation: 'mackenzie-1981' },
  steerDeg: 5,
  scanSectorDeg: 40,
  taper: { kind: 'hann' },
  elementStates: Array.from({ length: 8 }, (_, i) => ({
    enabled: true,
    gainDb: i === 3 ? 0.4 : 0,
    phaseDeg: i === 3 ? -2.5 : 0,
  })),
  plannedSources: [{ bearingDeg: -20 }, { bearingDeg: 14 }, { bearingDeg: 17 }],
  snapshots: 200,
  snrDb: 12,
};

export async function createArray({ user, config = baseConfig }: { user: User; config?: ArrayInputRaw }) {
  const input = arrayInputSchema.parse(config);
  const geometry = resolveArrayGeometry(input);
  const array = await ArrayDesign.create({
    teamId: user.teamId as number,
    name: input.name,
    latestRevision: 1,
    createdById: user.id,
  });
  const revision = await ArrayRevision.create({
    arrayId: array.id,
    revision: 1,
    authorId: user.id,
    config: input as unknown as Record<string, unknown>,
    elements: input.elements,
    spacingWavelengths: geometry.spacingWavelengths,
    frequencyHz: input.frequencyHz ?? null,
    propagationSpeedMps: geometry.speedMps ?? null,
  });
  return { array, revision, input, spacingWavelengths: geometry.spacingWavelengths };
}

/** Complex CSV (N rows of M "a+bj" cells) with round-trip number formatting. */
export function snapshotsCsv({
  elements,
  spacingWavelengths,
  bearingsDeg,
  snapshots,
  seed,
}: {
  elements: number;
  spacingWavelengths: number;
  bearingsDeg: number[];
  snapshots: number;
  seed: number;
}): string {
  const x = simulateSnapshots({
    elements,
    spacingWavelengths,
    bearingsDeg,
    powers: bearingsDeg.map(() => 4),
    noisePower: 0.25,
    snapshots,
    seed,
  });
  const lines: string[] = [];
  for (let n = 0; n < snapshots; n++) {
    const cells: string[] = [];
    for (let m = 0; m < elements; m++) {
      const re = x.re[m * snapshots + n];
      const im = x.im[m * snapshots + n];
      cells.push(`${re}${im < 0 || Object.is(im, -0) ? '' : '+'}${im}j`);
    }
    lines.push(cells.join(','));
  }
  return lines.join('\n') + '\n';
}

export async function createDataset({
  user,
  elements,
  spacingWavelengths,
  bearingsDeg = [-20, 14],
  snapshots = 200,
  seed = 7,
  arrayId = null,
}: {
  user: User;
  elements: number;
  spacingWavelengths: number;
  bearingsDeg?: number[];
  snapshots?: number;
  seed?: number;
  arrayId?: number | null;
}) {
  const text = snapshotsCsv({ elements, spacingWavelengths, bearingsDeg, snapshots, seed });
  const rel = path.join('datasets', String(user.teamId), `${randomUUID()}.csv`);
  const full = path.join(dataDir(), rel);
  fs.mkdirSync(path.dirname(full), { recursive: true });
  fs.writeFileSync(full, text);
  const dataset = await Dataset.create({
    teamId: user.teamId as number,
    name: 'Trial 3, two contacts',
    format: 'csv',
    elements,
    snapshots,
    sha256: createHash('sha256').update(text).digest('hex'),
    bytes: Buffer.byteLength(text),
    originalName: 'trial-3.csv',
    storagePath: rel,
    arrayId,
    options: null,
    details: null,
    uploadedById: user.id,
  });
  return { dataset, text };
}

export async function createRun({
  user,
  revision,
  dataset,
  spacingWavelengths,
  methods = ['esprit-tls', 'root-music', 'music'] as DoaMethod[],
  sourceCount = 2,
}: {
  user: User;
  revision: ArrayRevision;
  dataset: Dataset;
  spacingWavelengths: number;
  methods?: DoaMethod[];
  sourceCount?: number;
}) {
  // The data as the dataset reader gives it (N × M, one snapshot per row), as the runs use it.
  const parsed = await parseSnapshotFile({
    path: path.join(dataDir(), dataset.storagePath),
    format: 'csv',
    fileName: dataset.originalName,
  });
  const rows = { rows: parsed.snapshots, cols: parsed.elements, re: parsed.re, im: parsed.im };
  const options = { sourceCount, forwardBackward: true };
  const results = methods.map((method) => {
    const r = estimateBearings({ rows, spacingWavelengths, method, ...options });
    return {
      method: r.method,
      sourceCount: r.sourceCount,
      sourceCountRule: r.sourceCountRule,
      bearingsDeg: r.bearingsDeg,
      eigenvalues: r.eigenvalues,
      warnings: r.warnings.map((w) => ({ code: w.code, message: w.message })),
    };
  });
  const request = { datasetId: dataset.id, arrayId: revision.arrayId as number, methods, ...options };
  const run = await EstimateRun.create({
    teamId: user.teamId as number,
    status: 'done',
    progress: 1,
    datasetId: dataset.id,
    datasetSha256: dataset.sha256,
    arrayRevisionId: revision.id,
    inputs: {
      request,
      methods,
      options,
      array: {
        elements: dataset.elements,
        spacingWavelengths,
        arrayId: revision.arrayId as number,
        arrayRevisionId: revision.id,
        revision: revision.revision,
      },
      dataset: {
        id: dataset.id,
        sha256: dataset.sha256,
        name: dataset.name,
        elements: dataset.elements,
        snapshots: dataset.snapshots,
      },
    },
    result: { results },
    softwareVersion: '0.1.0',
    createdById: user.id,
  });
  return { run, results };
}

/** Files under the data folder's datasets/ and uploads/ (to check that a refusal leaves none behind). */
export function storedFiles(): string[] {
  const out: string[] = [];
  const walk = (dir: string) => {
    if (!fs.existsSync(dir)) return;
    for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
      const full = path.join(dir, e.name);
      if (e.isDirectory()) walk(full);
      else out.push(path.relative(dataDir(), full));
    }
  };
  walk(path.join(dataDir(), 'datasets'));
  walk(path.join(dataDir(), 'uploads'));
  return out.sort();
}
