/**
 * The demo bearing–time record: an invented two-minute recording on the Port Alder
 * hydrophone line (16 elements, the demo array's spacing and sound speed) at
 * 8 kHz, simulated broadband with true time delays (lib/doa/wideband
 * BroadbandSimulator, written by lib/btr/simulated-wav.ts), stored as a WAV
 * dataset, and one finished record of it computed at seed time with the same
 * code the job runs (computeBtrBlocks, then finishRecord).
 *
 * Scenario (fictional): the pilot cutter "Halyard Rose" crosses the line's
 * broadside from −35° to +30° at about 0.54°/s, while the dredger "Brindle Mole"
 * works slowly from +62° to +58° near the harbour mouth; spatially white ambient
 * noise on every hydrophone.
 *
 * Seed time is a few seconds (about 1 s of simulation and 2–3 s of analysis on a
 * quiet core); STEERWISE_SEED_BTR=0 skips it (the API tests set it, except where
 * they need the record). Idempotent: skipped when the dataset exists.
 */
import fs from 'node:fs';
import path from 'node:path';
import type { Transaction } from 'sequelize';
import { ArrayDesign, ArrayRevision, BearingTimeRecord, Dataset } from '@/models';
import { parseSnapshotFile, sha256File } from '../datasets';
import { dataDir } from '../env';
import { summarise } from '../storage/summary';
import { writeSimulatedWav } from '../btr/simulated-wav';
import { finishRecord, type BtrInputs } from '../btr/result';
import { computeBtrBlocks } from '../jobs/btr-blocks';
import { blockCount, planWideband, type BroadbandSource } from '../doa/wideband';
import { bearingTimeRecordRequestSchema } from '../validations/bearing-time-record';
import { SOFTWARE_VERSION } from '../version';

export const DEMO_BTR_DATASET = 'Port Alder harbour line — two-minute broadband recording (Halyard Rose crossing)';
export const DEMO_BTR_NAME = 'Port Alder line: Halyard Rose crossing, Brindle Mole at the mouth';
const ARRAY_NAME = 'Port Alder hydrophone line';
const SAMPLE_RATE = 8000;
const DURATION_S = 120;
const SEED = 4140;

export const DEMO_BTR_SOURCES: BroadbandSource[] = [
  {
    trajectory: [
      { tS: 0, bearingDeg: -35 },
      { tS: DURATION_S, bearingDeg: 30 },
    ],
    rms: 0.05,
    bandHz: [300, 2600],
  },
  {
    trajectory: [
      { tS: 0, bearingDeg: 62 },
      { tS: DURATION_S, bearingDeg: 58 },
    ],
    rms: 0.03,
    bandHz: [400, 2400],
  },
];

export async function seedDemoBearingTimeRecord({
  teamId,
  uploadedById,
  transaction,
}: {
  teamId: number;
  uploadedById: number | null;
  transaction?: Transaction;
}): Promise<boolean> {
  if (process.env.STEERWISE_SEED_BTR === '0') return false;
  if (await Dataset.findOne({ where: { teamId, name: DEMO_BTR_DATASET }, transaction })) return false;
  const array = await ArrayDesign.findOne({ where: { teamId, name: ARRAY_NAME }, transaction });
  if (!array) return false;
  const revision = await ArrayRevision.findOne({
    where: { arrayId: array.id, revision: array.latestRevision },
    transaction,
  });
  if (!revision?.frequencyHz || !revision.propagationSpeedMps) return false;
  const speed = revision.propagationSpeedMps;
  const spacingM = (revision.spacingWavelengths * speed) / revision.frequencyHz;

  const rel = path.join('datasets', String(teamId), 'demo-harbour-line-broadband.wav');
  const file = path.join(dataDir(), rel);
  fs.mkdirSync(path.dirname(file), { recursive: true });
  const bytes = await writeSimulatedWav(`${file}.part`, {
    elements: revision.elements,
    spacingM,
    propagationSpeedMps: speed,
    sampleRate: SAMPLE_RATE,
    durationS: DURATION_S,
    sources: DEMO_BTR_SOURCES,
    noiseRms: 0.03,
    seed: SEED,
    firTaps: 127,
  });
  fs.renameSync(`${file}.part`, file);
  const parsed = await parseSnapshotFile({ path: file, format: 'wav', frequencyHz: 1500 });
  const dataset = await Dataset.create(
    {
      teamId,
      name: DEMO_BTR_DATASET,
      format: 'wav',
      elements: parsed.elements,
      snapshots: parsed.snapshots,
      sha256: await sha256File(file),
      bytes,
      originalName: 'demo-harbour-line-broadband.wav',
      storagePath: rel,
      arrayId: array.id,
      options: { frequencyHz: 1500 },
      details: {
        ...(parsed.details as unknown as Record<string, unknown>),
        summary: summarise(parsed),
        demo: {
          simulated: true,
          seed: SEED,
          broadband: true,
          trajectories: DEMO_BTR_SOURCES.map((s) => s.trajectory),
        },
      },
      uploadedById,
    },
    { transaction },
  );

  const request = bearingTimeRecordRequestSchema.parse({
    name: DEMO_BTR_NAME,
    datasetId: dataset.id,
    arrayId: array.id,
    band: { lowHz: 400, highHz: 2600 },
    blockSeconds: 1,
    blockOverlap: 0.5,
    fftLength: 128,
    hop: 128,
    method: 'music',
    sourceCount: 2,
  });
  const options = {
    elements: revision.elements,
    spacingM,
    propagationSpeedMps: speed,
    band: request.band,
    blockSeconds: request.blockSeconds,
    blockOverlap: request.blockOverlap,
    fftLength: request.fftLength,
    hop: request.hop,
    window: request.window,
    method: request.method,
    sourceCount: request.sourceCount,
    gratingLobes: request.gratingLobes,
  };
  const samples = SAMPLE_RATE * DURATION_S;
  const blocks = blockCount(planWideband(options, { sampleRate: SAMPLE_RATE, channels: revision.elements }), samples);
  const inputs: BtrInputs = {
    request,
    options,
    dataset: {
      id: dataset.id,
      name: dataset.name,
      format: 'wav',
      originalName: dataset.originalName,
      storagePath: rel,
      sha256: dataset.sha256,
      bytes,
    },
    recording: {
      sampleRate: SAMPLE_RATE,
      channels: revision.elements,
      samplesPerChannel: samples,
      durationS: DURATION_S,
    },
    array: {
      elements: revision.elements,
      spacingM,
      arrayId: array.id,
      arrayRevisionId: revision.id,
      revision: revision.revision,
      name: array.name,
    },
    blockCount: blocks,
  };
  const started = Date.now();
  const part = await computeBtrBlocks(
    {
      path: file,
      format: 'wav',
      fileName: dataset.originalName,
      maxBytes: bytes + 1,
      options,
      blockRange: { first: 0, count: blocks },
    },
    () => undefined,
  );
  const row = await BearingTimeRecord.create(
    {
      teamId,
      name: DEMO_BTR_NAME,
      status: 'done',
      progress: 1,
      datasetId: dataset.id,
      datasetSha256: dataset.sha256,
      arrayRevisionId: revision.id,
      inputs: inputs as unknown as Record<string, unknown>,
      softwareVersion: SOFTWARE_VERSION,
      createdById: uploadedById,
    },
    { transaction },
  );
  const resultRel = path.join('bearing-time-records', String(teamId), String(row.id));
  const summary = await finishRecord({ parts: [part], inputs, folder: path.join(dataDir(), resultRel), started });
  await row.update({ summary: summary as unknown as Record<string, unknown>, resultPath: resultRel }, { transaction });
  return true;
}
