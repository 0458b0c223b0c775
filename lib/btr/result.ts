/**
 * The stored result of a bearing–time record, shared by the job
 * (lib/data/bearing-time-records.ts) and the demo seed: the shares of blocks
 * joined in order, the tracks over the whole record (lib/doa/wideband joinBlockRanges:
 * trackBearings with the array's merge distance, defaultMergeDeg), the summary
 * kept in the row, and the result files of the record's folder:
 *   blocks.json   the per-block bearings, ±σ, source count and warnings;
 *   levels.f32    the full image, one row per block of `grid.count` float32 dB
 *                 values (little-endian), read for one block's spectrum and the PNG;
 *   image.json    the display grid (decimateImage: at most IMAGE_MAX_ROWS rows, the
 *                 group maximum in dB, 0.01 dB).
 */
import fs from 'node:fs';
import path from 'node:path';
import {
  decimateImage,
  defaultMergeDeg,
  planWideband,
  joinBlockRanges,
  type BearingTimeBlock,
  type Track,
  type WidebandOptions,
} from '../doa/wideband';
import type { TimeSeriesFormat } from '../datasets/time-series';
import type { BearingTimeRecordRequest } from '../validations/bearing-time-record';
import type { BtrBlocksOutput } from '../jobs/btr-blocks';

export const IMAGE_MAX_ROWS = 1024;
export const IMAGE_MAX_COLS = 721;
export interface BtrInputs {
  request: BearingTimeRecordRequest;
  options: WidebandOptions;
  dataset: {
    id: number;
    name: string;
    format: TimeSeriesFormat;
    originalName: string;
    storagePath: string;
    sha256: string;
    bytes: number;
  };
  recording: { sampleRate: number; channels: number; samplesPerChannel: number; durationS: number };
  array: {
    elements: number;
    spacingM: number;
    arrayId?: number;
    arrayRevisionId?: number;
    revision?: number;
    name?: string;
  };
  blockCount: number;
}

export interface BtrSummary {
  blockCount: number;
  grid: { startDeg: number; stepDeg: number; count: number };
  bins: BtrBlocksOutput['bins'];
  framesPerBlock: number;
  crbRedundancy: number;
  warnings: { code: string; message: string }[];
  tracks: BtrTrackDto[];
  mergeDeg: number;
  elapsedMs: number;
}

export interface BtrTrackDto {
  id: number;
  startS: number;
  endS: number;
  start: { tS: number; bearingDeg: number };
  end: { tS: number; bearingDeg: number };
  meanRateDegPerS: number;
  points: { tS: number; bearingDeg: number; measuredDeg: number; blockIndex: number }[];
}

export interface BtrBlockDto {
  index: number;
  startS: number;
  endS: number;
  sourceCount: number;
  bearingsDeg: number[];
  stdDeg: number[];
  warnings: string[];
}

export interface BtrImageDto {
  bearingsDeg: number[];
  timesS: number[];
  levelsDb: number[][];
}

export const round = (v: number, digits: number) => {
  const f = 10 ** digits;
  return Math.round(v * f) / f;
};

export function trackDto(t: Track): BtrTrackDto {
  const first = t.points[0];
  const last = t.points[t.points.length - 1];
  return {
    id: t.id,
    startS: t.startS,
    endS: t.endS,
    start: { tS: first.tS, bearingDeg: round(first.bearingDeg, 4) },
    end: { tS: last.tS, bearingDeg: round(last.bearingDeg, 4) },
    meanRateDegPerS: round(t.meanRateDegPerS, 6),
    points: t.points.map((p) => ({
      tS: p.tS,
      bearingDeg: round(p.bearingDeg, 4),
      measuredDeg: round(p.measuredDeg, 4),
      blockIndex: p.blockIndex,
    })),
  };
}

export async function writeResult(
  folder: string,
  blocks: BearingTimeBlock[],
  levels: Float32Array,
  grid: BtrSummary['grid'],
): Promise<void> {
  await fs.promises.mkdir(folder, { recursive: true });
  const blockDtos: BtrBlockDto[] = blocks.map((b) => ({
    index: b.index,
    startS: b.startS,
    endS: b.endS,
    sourceCount: b.sourceCount,
    bearingsDeg: b.bearingsDeg.map((v) => round(v, 4)),
    stdDeg: b.stdDeg.map((v) => round(v, 5)),
    warnings: b.warnings,
  }));
  const image = decimateImage(
    { blocks, image: { ...grid, levelsDb: levels } },
    IMAGE_MAX_ROWS,
    Math.min(IMAGE_MAX_COLS, grid.count),
  );
  const imageDto: BtrImageDto = {
    bearingsDeg: image.bearingsDeg.map((v) => round(v, 4)),
    timesS: image.timesS.map((v) => round(v, 6)),
    levelsDb: image.levelsDb.map((row) => row.map((v) => (Number.isFinite(v) ? round(v, 2) : -300))),
  };
  const bytes = Buffer.from(levels.buffer, levels.byteOffset, levels.byteLength);
  await fs.promises.writeFile(path.join(folder, 'levels.f32'), bytes);
  await fs.promises.writeFile(path.join(folder, 'blocks.json'), JSON.stringify(blockDtos));
  await fs.promises.writeFile(path.join(folder, 'image.json'), JSON.stringify(imageDto));
}

/** Joins the shares, forms the tracks, writes the result files into `folder` and returns the row's summary. */
export async function finishRecord({
  parts,
  inputs,
  folder,
  started,
}: {
  parts: BtrBlocksOutput[];
  inputs: Pick<BtrInputs, 'options' | 'recording'>;
  folder: string;
  started: number;
}): Promise<BtrSummary> {
  const grid = parts[0].grid;
  const plan = planWideband(inputs.options, {
    sampleRate: inputs.recording.sampleRate,
    channels: inputs.recording.channels,
  });
  const mergeDeg = defaultMergeDeg(plan);
  const { blocks, levelsDb: levels, tracks } = joinBlockRanges(parts, plan);
  const warnings = [...parts[0].warnings];
  for (const code of new Set(blocks.flatMap((b) => b.warnings))) {
    const n = blocks.filter((b) => b.warnings.includes(code)).length;
    warnings.push({ code, message: `${n} of ${blocks.length} blocks: ${code}` });
  }
  await writeResult(folder, blocks, levels, grid);
  return {
    blockCount: blocks.length,
    grid,
    bins: parts[0].bins,
    framesPerBlock: parts[0].framesPerBlock,
    crbRedundancy: parts[0].crbRedundancy,
    warnings,
    tracks: tracks.map(trackDto),
    mergeDeg,
    elapsedMs: Date.now() - started,
  };
}
