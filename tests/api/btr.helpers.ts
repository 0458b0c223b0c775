/**
 * Time-series datasets for the bearing–time record tests: a simulated broadband
 * WAV (lib/btr/simulated-wav.ts, time-domain delays) or raw bytes written under
 * the data folder with a dataset row, as an upload would leave them, and a wait
 * for a record's job.
 */
import fs from 'node:fs';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { BearingTimeRecord, Dataset, type User } from '@/models';
import { dataDir } from '@/lib/env';
import { sha256File } from '@/lib/datasets';
import { writeSimulatedWav } from '@/lib/btr/simulated-wav';
import type { BroadbandSource } from '@/lib/doa/wideband';

/** The tiny test line: 4 elements 0.25 m apart, 1500 m/s, 4 kHz; d = λ/2 at 3 kHz. */
export const TINY = { elements: 4, spacingM: 0.25, propagationSpeedMps: 1500, sampleRate: 4000 };

export async function storeRawDataset({
  user,
  bytes,
  ext,
  format,
  elements = 4,
  options = null,
}: {
  user: User;
  bytes: Buffer;
  ext: string;
  format: 'wav' | 'npy' | 'csv';
  elements?: number;
  options?: Record<string, unknown> | null;
}): Promise<Dataset> {
  const rel = path.join('datasets', String(user.teamId), `${randomUUID()}${ext}`);
  const full = path.join(dataDir(), rel);
  fs.mkdirSync(path.dirname(full), { recursive: true });
  fs.writeFileSync(full, bytes);
  return Dataset.create({
    teamId: user.teamId as number,
    name: `Test recording ${path.basename(rel)}`,
    format,
    elements,
    snapshots: 1,
    sha256: await sha256File(full),
    bytes: bytes.length,
    originalName: `recording${ext}`,
    storagePath: rel,
    arrayId: null,
    options,
    uploadedById: user.id,
  });
}

/** A simulated WAV recording on the tiny line, stored as a dataset of the user's team. */
export async function storeSimulatedWav({
  user,
  durationS = 3,
  sources = [{ trajectory: [{ tS: 0, bearingDeg: 20 }], rms: 0.05, bandHz: [400, 1600] }],
  elements = TINY.elements,
  seed = 5,
}: {
  user: User;
  durationS?: number;
  sources?: BroadbandSource[];
  elements?: number;
  seed?: number;
}): Promise<Dataset> {
  const rel = path.join('datasets', String(user.teamId), `${randomUUID()}.wav`);
  const full = path.join(dataDir(), rel);
  fs.mkdirSync(path.dirname(full), { recursive: true });
  const bytes = await writeSimulatedWav(full, {
    elements,
    spacingM: TINY.spacingM,
    propagationSpeedMps: TINY.propagationSpeedMps,
    sampleRate: TINY.sampleRate,
    durationS,
    sources,
    noiseRms: 0.01,
    seed,
    firTaps: 63,
  });
  return Dataset.create({
    teamId: user.teamId as number,
    name: `Simulated line recording ${seed}`,
    format: 'wav',
    elements,
    snapshots: 1,
    sha256: await sha256File(full),
    bytes,
    originalName: 'line.wav',
    storagePath: rel,
    arrayId: null,
    options: { frequencyHz: 1000 },
    uploadedById: user.id,
  });
}

/** A request body on a stored recording of the tiny line. */
export const tinyBtrBody = (datasetId: number, extra: Record<string, unknown> = {}) => ({
  datasetId,
  array: { elements: TINY.elements, spacingM: TINY.spacingM },
  propagationSpeedMps: TINY.propagationSpeedMps,
  band: { lowHz: 400, highHz: 1600 },
  blockSeconds: 0.5,
  blockOverlap: 0.5,
  fftLength: 128,
  method: 'music',
  sourceCount: 1,
  ...extra,
});

/** Waits until the record's job has ended; returns its final status. */
export async function waitForRecord(id: number, timeoutMs = 60_000): Promise<string> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const row = await BearingTimeRecord.findByPk(id);
    if (!row) return 'deleted';
    if (!['queued', 'running'].includes(row.status)) return row.status;
    if (Date.now() > until) throw new Error(`record ${id} still ${row.status} after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 50));
  }
}
