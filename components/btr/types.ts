/**
 * The shapes the bearing–time record pages read from /api/v1/bearing-time-records
 * (docs/conventions.md §9 for blocks and times). Only the fields the pages use.
 */
export type BtrStatus = 'queued' | 'running' | 'done' | 'failed' | 'cancelled';

export interface BtrBlock {
  index: number;
  startS: number;
  endS: number;
  sourceCount?: number;
  bearingsDeg: number[];
  stdDeg: number[];
  warnings?: string[];
}

export interface BtrTrack {
  id: number;
  startS: number;
  endS: number;
  start?: { tS: number; bearingDeg: number };
  end?: { tS: number; bearingDeg: number };
  meanRateDegPerS: number;
  points: { tS: number; bearingDeg: number; measuredDeg?: number; blockIndex?: number }[];
}

export interface BtrImage {
  bearingsDeg: number[];
  timesS: number[];
  levelsDb: number[][];
}

export interface BtrRecord {
  id: number;
  name: string;
  status: BtrStatus;
  progress: number;
  error: string | null;
  datasetId: number | null;
  createdAt: string;
  createdBy: { id: number; name: string } | null;
  softwareVersion?: string;
  inputs?: {
    request?: Record<string, unknown>;
    options?: {
      elements?: number;
      spacingM?: number;
      propagationSpeedMps?: number;
      band?: { lowHz: number; highHz: number };
      blockSeconds?: number;
      blockOverlap?: number;
      fftLength?: number;
      hop?: number;
      window?: string;
      method?: string;
      sourceCount?: number;
      sourceCountRule?: string;
      gratingLobes?: string;
      bearingEstimator?: string;
    };
    dataset?: { id?: number; name?: string };
    recording?: { sampleRate: number; channels: number; samplesPerChannel?: number; durationS: number };
    array?: { name?: string; revision?: number; elements?: number; spacingM?: number };
    blockCount?: number;
  };
  blocks: BtrBlock[];
  tracks: BtrTrack[];
  image: BtrImage | null;
  summary?: {
    blockCount?: number;
    bins?: { count: number; lowHz: number; highHz: number; gratingLobeBins: number; excludedBins: number };
    framesPerBlock?: number;
    warnings?: { code: string; message: string }[];
    mergeDeg?: number;
    elapsedMs?: number;
  } | null;
}

export interface BtrListItem {
  id: number;
  name: string;
  status: BtrStatus;
  progress: number;
  error: string | null;
  datasetName: string;
  method: string;
  band: { lowHz: number; highHz: number };
  durationS: number;
  blockCount: number;
  trackCount: number | null;
  arrayLabel: string;
  createdAt: string;
  createdBy: { id: number; name: string } | null;
}

/** GET …/{id}/blocks/{index}: the block with its wideband spectrum on the record's grid. */
export interface BtrBlockDetail extends BtrBlock {
  spectrum: { bearingsDeg: number[]; levelsDb: number[] };
}

export const BTR_METHOD_LABELS: Record<string, string> = {
  music: 'Wideband MUSIC',
  mvdr: 'Wideband MVDR',
  bartlett: 'Wideband Bartlett',
};
