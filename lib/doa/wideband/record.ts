/**
 * The bearing–time record of a recording: blocks (docs/conventions.md §9), one
 * BlockAnalyzer pass per block, then tracks.
 *
 * Memory: the record keeps one block of samples as float32 (M × B), moving it
 * by the block step (copyWithin) and reading only the new samples; the STFT of
 * one block (bins × frames × M complex); and the output rows (one float32 dB
 * row of the grid per block). A 5-minute 16-channel recording at 16 kHz with
 * 1 s blocks holds about 1 MB of samples at a time.
 *
 * Progress and cancellation: `onProgress(done, total)` after every block; the
 * signal is checked between blocks, and the promise then rejects with its reason.
 * `yieldEvery` blocks, the loop awaits a macrotask so a server stays responsive.
 */
import { BlockAnalyzer, type BlockAnalysis } from './analyze';
import { blockCount, planWideband, WidebandInputError, type WidebandOptions, type WidebandPlan } from './plan';
import type { SampleSource } from './source';
import { trackBearings, type Track, type TrackerOptions } from './tracker';

export interface BearingTimeBlock {
  index: number;
  startS: number;
  endS: number;
  sourceCount: number;
  bearingsDeg: number[];
  stdDeg: number[];
  warnings: string[];
}

export interface BearingTimeRecord {
  sampleRate: number;
  channels: number;
  blocks: BearingTimeBlock[];
  tracks: Track[];
  /** Rows of the image: levelsDb[j·count + i] = 10·log10 P(θ_i) of blocks[j], the normalised wideband spectrum. */
  image: { startDeg: number; stepDeg: number; count: number; levelsDb: Float32Array };
  bins: { count: number; lowHz: number; highHz: number; gratingLobeBins: number; excludedBins: number };
  framesPerBlock: number;
  /** η of the wideband CRB (crb.ts). */
  crbRedundancy: number;
  /** Plan-level warnings (e.g. 'few-frames'). */
  warnings: { code: string; message: string }[];
}

export interface RecordHooks {
  onProgress?: (done: number, total: number) => void;
  /** Called with each block's full analysis (e.g. to keep the spectrum of selected blocks). */
  onBlock?: (block: BearingTimeBlock, analysis: BlockAnalysis) => void;
  signal?: AbortSignal;
  tracker?: TrackerOptions;
  /** Await a macrotask every this many blocks (default 4; 0 = never). */
  yieldEvery?: number;
  /**
   * Only blocks first … first + count − 1 (0-based; default all), so a worker pool can share a
   * recording: the source must support `seek`. Block indices and times stay those of the whole
   * recording. Tracks are formed over the blocks analysed; to track a recording split across
   * workers, concatenate the blocks in order and call trackBearings once.
   */
  blockRange?: { first: number; count: number };
}

function checkAborted(signal: AbortSignal | undefined): void {
  if (signal?.aborted) throw signal.reason ?? new Error('aborted');
}

/** The record of a recording. The source is closed when the promise settles, also on errors. */
export async function bearingTimeRecord(
  source: SampleSource,
  options: WidebandOptions,
  hooks: RecordHooks = {},
): Promise<BearingTimeRecord> {
  try {
    return await recordBlocks(source, options, hooks);
  } finally {
    await source.close();
  }
}

async function recordBlocks(
  source: SampleSource,
  options: WidebandOptions,
  hooks: RecordHooks,
): Promise<BearingTimeRecord> {
  const plan: WidebandPlan = planWideband(options, { sampleRate: source.sampleRate, channels: source.channels });
  const all = blockCount(plan, source.samplesPerChannel);
  if (all === 0) {
    throw new WidebandInputError(
      'blockSeconds',
      `the recording lasts ${(source.samplesPerChannel / source.sampleRate).toFixed(3)} s (${source.samplesPerChannel} samples), shorter than one block of ${options.blockSeconds} s`,
    );
  }
  const first = hooks.blockRange?.first ?? 0;
  const total = hooks.blockRange?.count ?? all;
  if (!Number.isInteger(first) || !Number.isInteger(total) || first < 0 || total < 1 || first + total > all) {
    throw new WidebandInputError(
      'blockRange',
      `blockRange {first: ${first}, count: ${total}} does not fit the ${all} blocks of this recording`,
    );
  }
  if (first > 0) {
    if (!source.seek)
      throw new WidebandInputError('blockRange', 'this sample source cannot seek, so blockRange must start at 0');
    await source.seek(first * plan.stepSamples);
  }
  const analyzer = new BlockAnalyzer(plan);
  const m = plan.elements;
  const bl = plan.blockSamples;
  const step = plan.stepSamples;
  const buffers = Array.from({ length: m }, () => new Float32Array(bl));
  const count = analyzer.angles.length;
  const levels = new Float32Array(total * count);
  const blocks: BearingTimeBlock[] = [];
  const warnings: { code: string; message: string }[] = [];
  if (plan.framesPerBlock < m) {
    warnings.push({
      code: 'few-frames',
      message: `each block has ${plan.framesPerBlock} frames for ${m} elements: the per-bin covariances are rank-deficient; lengthen the blocks or shorten the hop`,
    });
  }
  if (plan.gratingLobeBins > 0) {
    warnings.push({
      code: 'grating-lobe-bins',
      message: `${plan.gratingLobeBins} bins of the band have a spacing above half a wavelength and can alias`,
    });
  }
  const yieldEvery = hooks.yieldEvery ?? 4;
  const fs = plan.sampleRate;
  try {
    for (let j = 0; j < total; j++) {
      const b = first + j;
      checkAborted(hooks.signal);
      let need: number;
      let at: number;
      if (j === 0 || step >= bl) {
        // First block, or blocks that do not overlap: skip the gap, then read a whole block.
        if (j > 0 && step > bl) await skip(source, buffers, step - bl);
        need = bl;
        at = 0;
      } else {
        for (let c = 0; c < m; c++) buffers[c].copyWithin(0, step, bl);
        need = step;
        at = bl - step;
      }
      const got = await source.read(buffers, at, need);
      if (got !== need) {
        throw new WidebandInputError(
          'recording',
          `the recording ended early: block ${b + 1} needed ${need} more samples, got ${got}`,
        );
      }
      const analysis = analyzer.analyze(buffers);
      const row = levels.subarray(j * count, (j + 1) * count);
      for (let i = 0; i < count; i++) row[i] = 10 * Math.log10(analysis.spectrum[i]);
      const block: BearingTimeBlock = {
        index: b,
        startS: (b * step) / fs,
        endS: (b * step + bl) / fs,
        sourceCount: analysis.sourceCount,
        bearingsDeg: analysis.bearingsDeg,
        stdDeg: analysis.stdDeg,
        warnings: analysis.warnings,
      };
      blocks.push(block);
      hooks.onBlock?.(block, analysis);
      hooks.onProgress?.(j + 1, total);
      if (yieldEvery > 0 && (j + 1) % yieldEvery === 0) await new Promise((r) => setTimeout(r, 0));
    }
  } finally {
    await source.close();
  }
  const tracks = recordTracks(blocks, plan, hooks.tracker);
  return {
    sampleRate: fs,
    channels: m,
    blocks,
    tracks,
    image: { startDeg: plan.grid.startDeg, stepDeg: plan.grid.stepDeg, count, levelsDb: levels },
    bins: {
      count: plan.bins.length,
      lowHz: plan.binHz[0],
      highHz: plan.binHz[plan.binHz.length - 1],
      gratingLobeBins: plan.gratingLobeBins,
      excludedBins: plan.excludedBins,
    },
    framesPerBlock: plan.framesPerBlock,
    crbRedundancy: analyzer.redundancy,
    warnings,
  };
}

/**
 * The tracks of a record's blocks (in time order): trackBearings at the block centres with the
 * record's merge distance (defaultMergeDeg) unless `tracker` sets its own. A single pass and the
 * joined shares of a split record (joinBlockRanges) both track this way, so they agree.
 */
export function recordTracks(
  blocks: BearingTimeBlock[],
  plan: Pick<WidebandPlan, 'elements' | 'binSpacing'>,
  tracker?: TrackerOptions,
): Track[] {
  return trackBearings(
    blocks.map((bk) => ({ tS: 0.5 * (bk.startS + bk.endS), bearingsDeg: bk.bearingsDeg, stdDeg: bk.stdDeg })),
    { mergeDeg: defaultMergeDeg(plan), ...tracker },
  );
}

/**
 * Joins the shares of a record split with `blockRange` (e.g. one per worker thread): blocks and
 * image rows concatenated in block order, then the tracks over the whole record (recordTracks),
 * so the result equals a single pass. The shares may come in any order but must tile one range
 * of blocks exactly: a gap or a block analysed twice is an error.
 */
export function joinBlockRanges(
  parts: { blocks: BearingTimeBlock[]; levelsDb: Float32Array }[],
  plan: Pick<WidebandPlan, 'elements' | 'binSpacing'>,
  tracker?: TrackerOptions,
): { blocks: BearingTimeBlock[]; levelsDb: Float32Array; tracks: Track[] } {
  const sorted = parts.filter((p) => p.blocks.length > 0).sort((a, b) => a.blocks[0].index - b.blocks[0].index);
  const blocks: BearingTimeBlock[] = [];
  let values = 0;
  for (const p of sorted) {
    if (p.levelsDb.length % p.blocks.length !== 0)
      throw new RangeError(`a share has ${p.blocks.length} blocks but ${p.levelsDb.length} image values`);
    values += p.levelsDb.length;
    for (const bk of p.blocks) {
      const expected = blocks.length === 0 ? bk.index : blocks[blocks.length - 1].index + 1;
      if (bk.index !== expected)
        throw new RangeError(`the shares do not tile the record: block ${bk.index} follows block ${expected - 1}`);
      blocks.push(bk);
    }
  }
  const levelsDb = new Float32Array(values);
  let at = 0;
  for (const p of sorted) {
    levelsDb.set(p.levelsDb, at);
    at += p.levelsDb.length;
  }
  return { blocks, levelsDb, tracks: recordTracks(blocks, plan, tracker) };
}

/**
 * The tracker's merge distance for a plan: the broadside Rayleigh gap asin(min(1, 1/(M·d)))
 * (docs/conventions.md §5) at the spacing of the middle bin, in degrees. Closer than about
 * this, two contacts often give one peak in the wideband spectrum.
 */
export function defaultMergeDeg(plan: Pick<WidebandPlan, 'elements' | 'binSpacing'>): number {
  const d = plan.binSpacing[plan.binSpacing.length >> 1];
  return Math.asin(Math.min(1, 1 / (plan.elements * d))) / (Math.PI / 180);
}

async function skip(source: SampleSource, buffers: Float32Array[], count: number): Promise<void> {
  let left = count;
  while (left > 0) {
    const n = Math.min(left, buffers[0].length);
    const got = await source.read(buffers, 0, n);
    if (got !== n) throw new WidebandInputError('recording', 'the recording ended early while skipping between blocks');
    left -= n;
  }
}

export interface DecimatedImage {
  /** Bearing of each column (the centre of its group of grid points), degrees. */
  bearingsDeg: number[];
  /** Time of each row (the centre of its group of block centres), seconds. */
  timesS: number[];
  /** levelsDb[r][c]: the maximum dB over the group (peaks survive decimation). */
  levelsDb: number[][];
}

/**
 * A display grid of at most maxRows × maxCols from the image rows of a record:
 * consecutive blocks and grid points are grouped evenly and each cell keeps the
 * group's maximum in dB, so narrow tracks stay visible. Rows keep time order.
 */
export function decimateImage(
  record: Pick<BearingTimeRecord, 'image' | 'blocks'>,
  maxRows: number,
  maxCols: number,
): DecimatedImage {
  const { startDeg, stepDeg, count, levelsDb } = record.image;
  const nBlocks = record.blocks.length;
  if (!Number.isInteger(maxRows) || maxRows < 1 || !Number.isInteger(maxCols) || maxCols < 1) {
    throw new WidebandInputError('image', `maxRows ${maxRows} and maxCols ${maxCols} must be positive integers`);
  }
  const rows = Math.min(maxRows, nBlocks);
  const cols = Math.min(maxCols, count);
  const rowEdge = (r: number) => Math.round((r * nBlocks) / rows);
  const colEdge = (c: number) => Math.round((c * count) / cols);
  const bearingsDeg: number[] = [];
  for (let c = 0; c < cols; c++) {
    const a = colEdge(c);
    const b = colEdge(c + 1) - 1;
    bearingsDeg.push(startDeg + 0.5 * (a + b) * stepDeg);
  }
  const timesS: number[] = [];
  const out: number[][] = [];
  for (let r = 0; r < rows; r++) {
    const r0 = rowEdge(r);
    const r1 = rowEdge(r + 1);
    const first = record.blocks[r0];
    const last = record.blocks[r1 - 1];
    timesS.push(0.25 * (first.startS + first.endS + last.startS + last.endS));
    const line: number[] = [];
    for (let c = 0; c < cols; c++) {
      const c0 = colEdge(c);
      const c1 = colEdge(c + 1);
      let best = -Infinity;
      for (let b = r0; b < r1; b++) {
        const row = b * count;
        for (let i = c0; i < c1; i++) if (levelsDb[row + i] > best) best = levelsDb[row + i];
      }
      line.push(best);
    }
    out.push(line);
  }
  return { bearingsDeg, timesS, levelsDb: out };
}
