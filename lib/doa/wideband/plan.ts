/**
 * Options of a bearing–time record and their resolution into an analysis plan
 * (docs/conventions.md §6 and §9).
 *
 * Units: seconds, hertz, metres, metres per second; bearings in degrees from
 * broadside (docs/conventions.md §1). With fs the sample rate and L the FFT length:
 *  - block length B = round(blockSeconds·fs) samples; block b starts at sample
 *    b·S with S = round(blockSeconds·(1 − blockOverlap)·fs); only whole blocks
 *    are used, so there are floor((samples − B)/S) + 1 blocks; startS = b·S/fs,
 *    endS = (b·S + B)/fs;
 *  - inside a block, frame t starts at block sample t·hop and only whole frames
 *    are used: T = floor((B − L)/hop) + 1 frames (docs/conventions.md §6);
 *  - the bins are k = ceil(lowHz·L/fs) … floor(highHz·L/fs), i.e. every bin whose
 *    centre k·fs/L lies in [lowHz, highHz], without DC (k = 0) and the real
 *    Nyquist bin (k = L/2);
 *  - bin k uses its own spacing in wavelengths d_k = spacingM·f_k/c
 *    (docs/conventions.md §9). A bin with d_k > 1/2 can alias (grating lobes): it is
 *    left out (`gratingLobes: 'exclude'`, the default) or kept and counted in
 *    `gratingLobeBins` (`'include'`).
 * Every refusal is a WidebandInputError naming the option (`field`).
 */
import { DoaInputError } from '../errors';
import type { SourceCountRule } from '../methods/source-count';
import { validateGrid, type AngleGrid } from '../methods/spectrum';

export type WidebandWindow = 'hann' | 'hamming' | 'rectangular';
export type WidebandMethod = 'music' | 'mvdr' | 'bartlett';
/**
 * How bearings are taken per block:
 *  - 'spectrum-peaks': the K largest peaks of the wideband spectrum, refined off the grid;
 *  - 'per-bin-music': per bin, the local minimum of the MUSIC null spectrum ‖Enᴴa‖² next to
 *    each wideband peak, combined across bins with inverse-variance weights;
 *  - 'per-bin-root-music': per bin, root-MUSIC (Barabell 1983) roots associated with the
 *    wideband peaks, combined the same way.
 */
export type WidebandBearingEstimator = 'spectrum-peaks' | 'per-bin-music' | 'per-bin-root-music';

export interface WidebandOptions {
  /** Element count M; must equal the recording's channel count. */
  elements: number;
  /** Element spacing in metres. */
  spacingM: number;
  /** Propagation speed c in m/s. */
  propagationSpeedMps: number;
  band: { lowHz: number; highHz: number };
  blockSeconds: number;
  /** Fraction of a block shared with the next, in [0, 1). */
  blockOverlap: number;
  /** FFT length, a power of two from 16 to 65536. */
  fftLength: number;
  /** Hop between frame starts in samples (default fftLength). */
  hop?: number;
  /** Default 'hann' (periodic). */
  window?: WidebandWindow;
  method: WidebandMethod;
  /** Given source count K; when absent it follows sourceCountRule per bin, combined by the median. */
  sourceCount?: number;
  /** Default 'mdl'. */
  sourceCountRule?: SourceCountRule;
  /** Default 'exclude'. */
  gratingLobes?: 'exclude' | 'include';
  /** Default 'per-bin-music' for method music, else 'spectrum-peaks' (the only choice there). */
  bearingEstimator?: WidebandBearingEstimator;
  /** Bearing grid of the spectral rows; default −90 … 90° in 0.5° steps (361 points). */
  grid?: AngleGrid;
  /** Refine 'spectrum-peaks' bearings off the grid (golden-section search); default true. */
  refinePeaks?: boolean;
}

export const WIDEBAND_DEFAULT_GRID: AngleGrid = Object.freeze({ startDeg: -90, stepDeg: 0.5, count: 361 });

export class WidebandInputError extends DoaInputError {
  /** The option at fault, dotted for nested ones (e.g. 'band.highHz'). */
  readonly field: string;
  constructor(field: string, message: string) {
    super('bad-option', message);
    this.name = 'WidebandInputError';
    this.field = field;
  }
}

export interface WidebandPlan {
  readonly options: Readonly<WidebandOptions>;
  readonly elements: number;
  readonly sampleRate: number;
  readonly fftLength: number;
  readonly hop: number;
  readonly window: WidebandWindow;
  readonly method: WidebandMethod;
  readonly sourceCount: number | null;
  readonly sourceCountRule: SourceCountRule;
  readonly estimator: WidebandBearingEstimator;
  readonly refinePeaks: boolean;
  readonly grid: AngleGrid;
  readonly blockSamples: number;
  readonly stepSamples: number;
  readonly framesPerBlock: number;
  /** FFT bin indices used, ascending. */
  readonly bins: Int32Array;
  /** Centre frequency of each used bin in Hz. */
  readonly binHz: Float64Array;
  /** Spacing in wavelengths of each used bin, d_k = spacingM·f_k/c. */
  readonly binSpacing: Float64Array;
  /** Used bins with d_k > 1/2 (only with gratingLobes 'include'). */
  readonly gratingLobeBins: number;
  /** Bins in the band left out because d_k > 1/2 (gratingLobes 'exclude'). */
  readonly excludedBins: number;
}

function positiveNumber(value: unknown, field: string, what: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || !(value > 0)) {
    throw new WidebandInputError(field, `${field} ${String(value)} is not allowed: ${what}`);
  }
  return value;
}

/** Number of whole blocks in a recording of `samples` samples per channel. */
export function blockCount(plan: Pick<WidebandPlan, 'blockSamples' | 'stepSamples'>, samples: number): number {
  return samples < plan.blockSamples ? 0 : Math.floor((samples - plan.blockSamples) / plan.stepSamples) + 1;
}

/** Checks the options against a recording's sample rate and channel count and resolves the plan. */
export function planWideband(
  options: WidebandOptions,
  recording: { sampleRate: number; channels: number },
): WidebandPlan {
  if (options === null || typeof options !== 'object') throw new WidebandInputError('options', 'options are missing');
  const fs = recording.sampleRate;
  if (!Number.isFinite(fs) || !(fs > 0)) {
    throw new WidebandInputError('sampleRate', `sample rate ${String(fs)} Hz is not allowed: give a positive rate`);
  }
  const m = options.elements;
  if (!Number.isInteger(m) || m < 2) {
    throw new WidebandInputError('elements', `elements ${String(m)} is not allowed: an array needs at least 2`);
  }
  if (recording.channels < 2) {
    throw new WidebandInputError(
      'channels',
      `the recording has ${recording.channels} channel${recording.channels === 1 ? '' : 's'}; a bearing needs at least 2`,
    );
  }
  if (recording.channels !== m) {
    throw new WidebandInputError(
      'elements',
      `the array has ${m} elements but the recording has ${recording.channels} channels; they must be equal`,
    );
  }
  const spacingM = positiveNumber(options.spacingM, 'spacingM', 'give the element spacing in metres (> 0)');
  const c = positiveNumber(
    options.propagationSpeedMps,
    'propagationSpeedMps',
    'give the propagation speed in m/s (> 0)',
  );
  if (!options.band || typeof options.band !== 'object') {
    throw new WidebandInputError('band', 'band {lowHz, highHz} is missing');
  }
  const { lowHz, highHz } = options.band;
  if (typeof lowHz !== 'number' || !Number.isFinite(lowHz) || lowHz < 0) {
    throw new WidebandInputError('band.lowHz', `band.lowHz ${String(lowHz)} is not allowed: use 0 Hz or more`);
  }
  if (typeof highHz !== 'number' || !Number.isFinite(highHz) || !(highHz > lowHz)) {
    throw new WidebandInputError(
      'band.highHz',
      `band.highHz ${String(highHz)} is not allowed: it must be a number above band.lowHz (${lowHz} Hz)`,
    );
  }
  if (highHz > fs / 2) {
    throw new WidebandInputError(
      'band.highHz',
      `band.highHz ${highHz} Hz is above the Nyquist frequency ${fs / 2} Hz of this ${fs} Hz recording`,
    );
  }
  const fftLength = options.fftLength;
  if (!Number.isInteger(fftLength) || fftLength < 16 || fftLength > 65536 || (fftLength & (fftLength - 1)) !== 0) {
    throw new WidebandInputError(
      'fftLength',
      `fftLength ${String(fftLength)} is not allowed: use a power of two from 16 to 65536`,
    );
  }
  const hop = options.hop ?? fftLength;
  if (!Number.isInteger(hop) || hop < 1 || hop > 1 << 24) {
    throw new WidebandInputError('hop', `hop ${String(hop)} is not allowed: use a whole number of samples, at least 1`);
  }
  const window = options.window ?? 'hann';
  if (window !== 'hann' && window !== 'hamming' && window !== 'rectangular') {
    throw new WidebandInputError('window', `window ${String(window)} is not known: use hann, hamming or rectangular`);
  }
  const method = options.method;
  if (method !== 'music' && method !== 'mvdr' && method !== 'bartlett') {
    throw new WidebandInputError('method', `method ${String(method)} is not known: use music, mvdr or bartlett`);
  }
  const blockSeconds = options.blockSeconds;
  if (typeof blockSeconds !== 'number' || !Number.isFinite(blockSeconds) || !(blockSeconds > 0)) {
    throw new WidebandInputError(
      'blockSeconds',
      `blockSeconds ${String(blockSeconds)} is not allowed: a block must last more than 0 s`,
    );
  }
  const overlap = options.blockOverlap;
  if (typeof overlap !== 'number' || !Number.isFinite(overlap) || overlap < 0 || overlap >= 1) {
    throw new WidebandInputError(
      'blockOverlap',
      `blockOverlap ${String(overlap)} is not allowed: use a fraction from 0 up to (not including) 1`,
    );
  }
  const blockSamples = Math.round(blockSeconds * fs);
  if (blockSamples < fftLength) {
    throw new WidebandInputError(
      'blockSeconds',
      `blockSeconds ${blockSeconds} s is ${blockSamples} samples at ${fs} Hz, shorter than one FFT frame (fftLength ${fftLength})`,
    );
  }
  const stepSamples = Math.round(blockSeconds * (1 - overlap) * fs);
  if (stepSamples < 1) {
    throw new WidebandInputError(
      'blockOverlap',
      `blockOverlap ${overlap} leaves less than one sample between block starts; lower it`,
    );
  }
  const framesPerBlock = Math.floor((blockSamples - fftLength) / hop) + 1;

  let sourceCount: number | null = null;
  if (options.sourceCount !== undefined && options.sourceCount !== null) {
    const k = options.sourceCount;
    if (!Number.isInteger(k) || k < 0 || k >= m) {
      throw new WidebandInputError(
        'sourceCount',
        `sourceCount ${String(k)} is not allowed: use a whole number from 0 to ${m - 1} (fewer than the ${m} elements)`,
      );
    }
    sourceCount = k;
  }
  const sourceCountRule = options.sourceCountRule ?? 'mdl';
  if (sourceCountRule !== 'mdl' && sourceCountRule !== 'aic') {
    throw new WidebandInputError(
      'sourceCountRule',
      `sourceCountRule ${String(sourceCountRule)} is not known: use mdl or aic`,
    );
  }
  const gratingLobes = options.gratingLobes ?? 'exclude';
  if (gratingLobes !== 'exclude' && gratingLobes !== 'include') {
    throw new WidebandInputError(
      'gratingLobes',
      `gratingLobes ${String(gratingLobes)} is not known: use exclude or include`,
    );
  }
  const estimator = options.bearingEstimator ?? (method === 'music' ? 'per-bin-music' : 'spectrum-peaks');
  if (estimator !== 'spectrum-peaks' && estimator !== 'per-bin-music' && estimator !== 'per-bin-root-music') {
    throw new WidebandInputError(
      'bearingEstimator',
      `bearingEstimator ${String(estimator)} is not known: use spectrum-peaks, per-bin-music or per-bin-root-music`,
    );
  }
  if (estimator !== 'spectrum-peaks' && method !== 'music') {
    throw new WidebandInputError(
      'bearingEstimator',
      `bearingEstimator ${estimator} needs method music (the per-bin estimates come from the noise subspace)`,
    );
  }
  const grid = options.grid ?? WIDEBAND_DEFAULT_GRID;
  try {
    validateGrid(grid);
  } catch (error) {
    throw new WidebandInputError('grid', (error as Error).message);
  }

  const kLow = Math.max(1, Math.ceil((lowHz * fftLength) / fs - 1e-9));
  const kHigh = Math.min(fftLength / 2 - 1, Math.floor((highHz * fftLength) / fs + 1e-9));
  const bins: number[] = [];
  let excludedBins = 0;
  let gratingLobeBins = 0;
  for (let k = kLow; k <= kHigh; k++) {
    const d = (spacingM * ((k * fs) / fftLength)) / c;
    if (d > 0.5) {
      if (gratingLobes === 'exclude') {
        excludedBins++;
        continue;
      }
      gratingLobeBins++;
    }
    bins.push(k);
  }
  if (kHigh < kLow) {
    throw new WidebandInputError(
      'band',
      `band ${lowHz}–${highHz} Hz holds no FFT bin: bins are ${fs / fftLength} Hz apart at fftLength ${fftLength}; widen the band or lengthen the FFT`,
    );
  }
  if (bins.length === 0) {
    const fMax = c / (2 * spacingM);
    throw new WidebandInputError(
      'band',
      `every bin of ${lowHz}–${highHz} Hz has a spacing above half a wavelength (above ${fMax.toFixed(1)} Hz for ${spacingM} m at ${c} m/s); lower the band or set gratingLobes to include`,
    );
  }
  const binsArr = Int32Array.from(bins);
  const binHz = Float64Array.from(bins, (k) => (k * fs) / fftLength);
  const binSpacing = Float64Array.from(binHz, (f) => (spacingM * f) / c);
  return {
    options,
    elements: m,
    sampleRate: fs,
    fftLength,
    hop,
    window,
    method,
    sourceCount,
    sourceCountRule,
    estimator,
    refinePeaks: options.refinePeaks ?? true,
    grid,
    blockSamples,
    stepSamples,
    framesPerBlock,
    bins: binsArr,
    binHz,
    binSpacing,
    gratingLobeBins,
    excludedBins,
  };
}
