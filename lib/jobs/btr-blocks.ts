/**
 * The compute of one share of a bearing–time record job (pure, no DB): blocks
 * `blockRange.first … first + count − 1` of a stored recording, read streaming
 * by lib/datasets openTimeSeries and analysed by lib/doa/wideband
 * bearingTimeRecord. The data module (lib/data/bearing-time-records.ts) splits a
 * record's blocks into one share per pool thread, joins the shares in order and
 * forms the tracks over the whole record.
 */
import { openTimeSeries, type TimeSeriesFormat } from '../datasets/time-series';
import { bearingTimeRecord, type BearingTimeBlock, type WidebandOptions } from '../doa/wideband';

export interface BtrBlocksInput {
  path: string;
  format: TimeSeriesFormat;
  fileName: string;
  /** NPY only. */
  sampleRate?: number;
  maxBytes: number;
  options: WidebandOptions;
  blockRange: { first: number; count: number };
}

export interface BtrBlocksOutput {
  blocks: BearingTimeBlock[];
  /** count × blocks dB values, row per block (the wideband spectrum on the grid). */
  levelsDb: Float32Array;
  grid: { startDeg: number; stepDeg: number; count: number };
  bins: { count: number; lowHz: number; highHz: number; gratingLobeBins: number; excludedBins: number };
  framesPerBlock: number;
  crbRedundancy: number;
  warnings: { code: string; message: string }[];
}

export async function computeBtrBlocks(
  input: BtrBlocksInput,
  report: (fraction: number) => void,
): Promise<BtrBlocksOutput> {
  const source = await openTimeSeries({
    path: input.path,
    format: input.format,
    fileName: input.fileName,
    maxBytes: input.maxBytes,
    ...(input.sampleRate !== undefined ? { sampleRate: input.sampleRate } : {}),
  });
  const record = await bearingTimeRecord(source, input.options, {
    blockRange: input.blockRange,
    yieldEvery: 0,
    onProgress: (done, total) => report(done / total),
  });
  return {
    blocks: record.blocks,
    levelsDb: record.image.levelsDb,
    grid: { startDeg: record.image.startDeg, stepDeg: record.image.stepDeg, count: record.image.count },
    bins: record.bins,
    framesPerBlock: record.framesPerBlock,
    crbRedundancy: record.crbRedundancy,
    warnings: record.warnings,
  };
}
