/**
 * estimateBearings: the one entry point the web layer calls.
 *
 * Input: snapshots as an M × N ComplexMatrix (`snapshots`, one snapshot per
 * column) or in file layout N × M (`rows`, one snapshot per row); split re/im,
 * row-major. The spacing d is in wavelengths; bearings are degrees from
 * broadside (docs/conventions.md §1).
 *
 * Pipeline (docs/conventions.md §2–4): sample covariance R = X·Xᴴ/N (Hermitian) or
 * the single-snapshot arrangement (L = ⌊M/2⌋+1 unless given; N counts as 1
 * for the source-count rule) → forward spatial smoothing (subarray L) →
 * forward–backward averaging → Hermitian EVD (descending) → source count
 * (given, or MDL by default, or AIC) → method → bearings ascending.
 *
 * Defaults: sourceCountRule 'mdl', forwardBackward false, no smoothing,
 * singleSnapshot false, includeSpectrum false, grid DEFAULT_GRID
 * (θ_i = (i−9000)/100°, i = 0 … 18000).
 *
 * Every option is checked on entry; bad input throws DoaInputError with a
 * message naming the option and the value.
 */
import { requireSpacing } from './checks';
import { ComplexMatrix } from './linalg/complex';
import { CovarianceAccumulator, defaultSingleSnapshotSubarray, forwardBackward, spatialSmoothing } from './covariance';
import { DoaInputError } from './errors';

import { hermitianEigen } from './linalg/hermitian-eigen';
import { conditionNumber, MVDR_CONDITION_LIMIT } from './methods/beamformers';
import {
  DOA_METHODS,
  DoaMethod,
  ESPRIT_METHODS,
  METHOD_RUNNERS,
  isDoaMethod,
  recommendedSmoothingSubarray,
} from './methods/registry';
import { SpectrumKind } from './methods/types';
import { musicSpectrumValues } from './methods/music';
import { SourceCountRule, sourceCountCriteria } from './methods/source-count';
import { AngleGrid, DEFAULT_GRID, gridAngles, toDecibels, validateGrid } from './methods/spectrum';
import { DoaWarning } from './warnings';
import { describeSelection, selectElements, type ElementSelectionKind } from './elements';

export interface EstimateBearingsOptions {
  /** M × N snapshot matrix (one snapshot per column). Give this or `rows`. */
  snapshots?: ComplexMatrix;
  /** N × M, one snapshot per row (the file layout). Give this or `snapshots`. */
  rows?: ComplexMatrix;
  /** Element spacing d in wavelengths (> 0). */
  spacingWavelengths: number;
  method: DoaMethod;
  /** Known source count K (0 ≤ K < effective elements); otherwise the rule picks it. */
  sourceCount?: number;
  /** Rule for K when `sourceCount` is absent. Default 'mdl'. */
  sourceCountRule?: SourceCountRule;
  /** Forward–backward averaging. Default false. */
  forwardBackward?: boolean;
  /** Forward spatial smoothing subarray L (2 … elements). Default: none. */
  smoothingSubarray?: number;
  /** Single-snapshot (Hankel) arrangement. Default false. */
  singleSnapshot?: boolean;
  /** Its subarray L; default ⌊M/2⌋+1. Only with singleSnapshot. */
  singleSnapshotSubarray?: number;
  /** Return the spectrum (the method's own, or MUSIC's for ESPRIT and root-MUSIC). Default false. */
  includeSpectrum?: boolean;
  /** Spectral grid. Default DEFAULT_GRID. */
  grid?: AngleGrid;
  /**
   * The enabled elements of the line, 0-based indices into the data's M elements, strictly
   * ascending (docs/conventions.md §9: element m stays at m·d). Default: all M. With gaps, the
   * method uses the elements lib/doa/elements.ts selectElements picks (spectral methods: all
   * enabled at their true positions; ESPRIT, root-MUSIC and any smoothing, single-snapshot or
   * forward–backward step: the longest contiguous run), and an 'element-subset' warning says so.
   */
  elementIndices?: readonly number[];
  /**
   * The M × M sample covariance X·Xᴴ/N of these snapshots when the caller already has it
   * (several methods on one run, or computed over worker threads by lib/jobs); it must
   * equal sampleCovariance of the data (the data then still give N and the sizes).
   */
  sampleCovariance?: ComplexMatrix;
}

export interface EstimateBearingsResult {
  method: DoaMethod;
  sourceCount: number;
  sourceCountRule: 'given' | SourceCountRule;
  /** Ascending. */
  bearingsDeg: number[];
  /** Of the covariance actually used, descending. */
  eigenvalues: number[];
  warnings: DoaWarning[];
  spectrum?: { kind: SpectrumKind; startDeg: number; stepDeg: number; valuesDb: Float64Array };
  /** L of the covariance actually used. */
  effectiveElements: number;
  /** MDL/AIC curves on those eigenvalues (k = 0 … L−1), with the N used. */
  criteria: { logLikelihood: number[]; mdl: number[]; aic: number[]; snapshotsUsed: number };
  /** Present when `elementIndices` was given: which elements were used (0-based on the full line). */
  elementSelection?: { kind: ElementSelectionKind; indices: number[]; lineElements: number };
}

/** Warn about a source count this close to the effective element count: L − K ≤ 2. */
export const NEAR_LIMIT_NOISE_DIMENSIONS = 2;
/** ESPRIT efficiency advice applies from this many elements on. */
export const ESPRIT_EFFICIENCY_ELEMENTS = 12;

export function estimateBearings(options: EstimateBearingsOptions): EstimateBearingsResult {
  if (options === null || typeof options !== 'object')
    throw new DoaInputError('bad-option', 'estimateBearings: options must be an object');
  if (options.elementIndices === undefined) return estimateOnPositions(options, undefined);
  const { elementIndices, snapshots, rows, ...rest } = options;
  if (!isDoaMethod(options.method)) {
    throw new DoaInputError('bad-option', `method "${String(options.method)}" is not one of ${DOA_METHODS.join(', ')}`);
  }
  if ((snapshots === undefined) === (rows === undefined)) {
    throw new DoaInputError('bad-option', 'give exactly one of `snapshots` (M × N) and `rows` (N × M)');
  }
  const data = (snapshots ?? rows) as ComplexMatrix;
  checkMatrixShape(data, snapshots ? 'snapshots' : 'rows');
  const m = snapshots ? data.rows : data.cols;
  const selection = selectElements(options.method, elementIndices, m, options);
  const summary = { kind: selection.kind, indices: selection.indices, lineElements: m };
  if (selection.kind === 'all')
    return { ...estimateOnPositions({ ...options, elementIndices: undefined }, undefined), elementSelection: summary };
  const picked = snapshots ? pickRows(data, selection.indices) : pickColumns(data, selection.indices);
  const first = selection.indices[0];
  const positions =
    selection.kind === 'enabled-true-positions' ? Int32Array.from(selection.indices, (i) => i - first) : undefined;
  const res = estimateOnPositions({ ...rest, ...(snapshots ? { snapshots: picked } : { rows: picked }) }, positions);
  res.warnings.unshift({ code: 'element-subset', message: `${describeSelection(options.method, selection)}.` });
  return { ...res, elementSelection: summary };
}

function pickRows(a: ComplexMatrix, indices: readonly number[]): ComplexMatrix {
  const re = new Float64Array(indices.length * a.cols);
  const im = new Float64Array(indices.length * a.cols);
  indices.forEach((r, i) => {
    re.set(a.re.subarray(r * a.cols, (r + 1) * a.cols), i * a.cols);
    im.set(a.im.subarray(r * a.cols, (r + 1) * a.cols), i * a.cols);
  });
  return { rows: indices.length, cols: a.cols, re, im };
}

function pickColumns(a: ComplexMatrix, indices: readonly number[]): ComplexMatrix {
  const l = indices.length;
  const re = new Float64Array(a.rows * l);
  const im = new Float64Array(a.rows * l);
  for (let r = 0; r < a.rows; r++) {
    for (let i = 0; i < l; i++) {
      re[r * l + i] = a.re[r * a.cols + indices[i]];
      im[r * l + i] = a.im[r * a.cols + indices[i]];
    }
  }
  return { rows: a.rows, cols: l, re, im };
}

/** The pipeline on one set of elements; `positions` (units of d, from 0) only for spectral methods on a line with gaps. */
function estimateOnPositions(
  options: EstimateBearingsOptions,
  positions: Int32Array | undefined,
): EstimateBearingsResult {
  const method = options.method;
  if (!isDoaMethod(method)) {
    throw new DoaInputError('bad-option', `method "${String(method)}" is not one of ${DOA_METHODS.join(', ')}`);
  }
  const d = options.spacingWavelengths;
  requireSpacing(d);
  const fb = optionalBoolean(options.forwardBackward, 'forwardBackward');
  const single = optionalBoolean(options.singleSnapshot, 'singleSnapshot');
  const includeSpectrum = optionalBoolean(options.includeSpectrum, 'includeSpectrum');
  const grid = options.grid ?? DEFAULT_GRID;
  validateGrid(grid);
  const rule = options.sourceCountRule ?? 'mdl';
  if (rule !== 'mdl' && rule !== 'aic')
    throw new DoaInputError('bad-option', `sourceCountRule "${String(rule)}" is neither "mdl" nor "aic"`);

  // Data and its size.
  const { snapshots, rows } = options;
  if ((snapshots === undefined) === (rows === undefined)) {
    throw new DoaInputError('bad-option', 'give exactly one of `snapshots` (M × N) and `rows` (N × M)');
  }
  const data = (snapshots ?? rows) as ComplexMatrix;
  checkMatrixShape(data, snapshots ? 'snapshots' : 'rows');
  const m = snapshots ? snapshots.rows : data.cols;
  const n = snapshots ? snapshots.cols : data.rows;
  if (m < 2) throw new DoaInputError('too-few-elements', `the array needs at least 2 elements, the data has ${m}`);
  if (n < 1) throw new DoaInputError('bad-size', 'the data holds no snapshots');

  // Sizes of the arrangement, checked before any arithmetic.
  let size = m;
  let singleL: number | undefined;
  if (options.singleSnapshotSubarray !== undefined && !single) {
    throw new DoaInputError('bad-option', 'singleSnapshotSubarray is only used with singleSnapshot: true');
  }
  if (single) {
    singleL = options.singleSnapshotSubarray ?? defaultSingleSnapshotSubarray(m);
    checkSubarray(singleL, m, 'singleSnapshotSubarray');
    size = singleL;
  }
  const smoothL = options.smoothingSubarray;
  if (smoothL !== undefined) {
    checkSubarray(smoothL, size, 'smoothingSubarray');
    size = smoothL;
  }
  const l = size;
  const given = options.sourceCount;
  if (given !== undefined) {
    if (!Number.isInteger(given) || given < 0)
      throw new DoaInputError('bad-source-count', `sourceCount ${given} is not an integer ≥ 0`);
    if (given >= l) {
      throw new DoaInputError(
        'bad-source-count',
        `sourceCount ${given} must be below the ${l} effective elements (K < L)`,
      );
    }
  }

  // Covariance chain.
  let sample: ComplexMatrix;
  if (options.sampleCovariance !== undefined) {
    sample = options.sampleCovariance;
    if (sample.rows !== m || sample.cols !== m || sample.re.length !== m * m || sample.im.length !== m * m)
      throw new DoaInputError('bad-size', `sampleCovariance is ${sample.rows} × ${sample.cols}, not ${m} × ${m}`);
  } else {
    const acc = new CovarianceAccumulator(m);
    if (snapshots) acc.addSnapshots(snapshots);
    else acc.addRows(data);
    sample = acc.covariance();
  }
  let trace = 0;
  for (let i = 0; i < m; i++) trace += sample.re[i * m + i];
  if (!(trace > 0))
    throw new DoaInputError('bad-value', 'the snapshots are all zero: there is nothing to estimate from');
  let r = sample;
  if (singleL !== undefined) r = spatialSmoothing(r, singleL);
  if (smoothL !== undefined) r = spatialSmoothing(r, smoothL);
  if (fb) r = forwardBackward(r);

  const eig = hermitianEigen(r);
  const nRule = single ? 1 : n;
  const crit = sourceCountCriteria(eig.values, nRule);
  const k = given ?? (rule === 'mdl' ? crit.mdlChoice : crit.aicChoice);

  const out = METHOD_RUNNERS[method]({
    covariance: r,
    eigenvalues: eig.values,
    eigenvectors: eig.vectors,
    sourceCount: k,
    spacingWavelengths: d,
    grid,
    ...(positions ? { positions } : {}),
  });

  const warnings: DoaWarning[] = [];
  if (!single && n < m) {
    warnings.push({
      code: 'few-snapshots',
      message: `${n} snapshot(s) for ${m} elements: the sample covariance is rank-deficient; use more snapshots, smoothing or the single-snapshot option`,
    });
  }
  if (k >= 1 && l - k <= NEAR_LIMIT_NOISE_DIMENSIONS) {
    warnings.push({
      code: 'source-count-near-limit',
      message: `${k} source(s) on ${l} effective elements leaves ${l - k} noise dimension(s); estimates become unreliable near K = L − 1`,
    });
  }
  const cond = conditionNumber(eig.values);
  if (method !== 'mvdr' && !(cond <= MVDR_CONDITION_LIMIT)) {
    warnings.push({
      code: 'ill-conditioned-covariance',
      message: `cond(R) = ${cond.toExponential(3)} exceeds 1e13: the covariance is nearly singular (noise-free or rank-deficient data)`,
    });
  }
  if (ESPRIT_METHODS.has(method) && m >= ESPRIT_EFFICIENCY_ELEMENTS && smoothL === undefined && !single) {
    const advice = recommendedSmoothingSubarray(m);
    warnings.push({
      code: 'esprit-efficiency',
      message: `ESPRIT with maximal-overlap subarrays on ${m} elements loses efficiency as M grows (error ∝ M^−1 instead of M^−1.5); set smoothingSubarray to about 2M/3 = ${advice}`,
    });
  }
  if (!single && smoothL === undefined && m >= 4 && !positions) {
    const coherent = coherenceCheck(sample, fb, n, crit.mdlChoice, m);
    if (coherent) warnings.push(coherent);
  }
  warnings.push(...out.warnings);

  let spectrum: EstimateBearingsResult['spectrum'];
  if (includeSpectrum) {
    const values = out.spectrum?.values ?? musicSpectrumValues(eig.vectors, k, d, gridAngles(grid), positions);
    spectrum = {
      kind: out.spectrum?.kind ?? 'music',
      startDeg: grid.startDeg,
      stepDeg: grid.stepDeg,
      valuesDb: toDecibels(values),
    };
  }

  return {
    method,
    sourceCount: k,
    sourceCountRule: given !== undefined ? 'given' : rule,
    bearingsDeg: out.bearingsDeg,
    eigenvalues: Array.from(eig.values),
    warnings,
    ...(spectrum ? { spectrum } : {}),
    effectiveElements: l,
    criteria: { logLikelihood: crit.logLikelihood, mdl: crit.mdl, aic: crit.aic, snapshotsUsed: nRule },
  };
}

/**
 * Coherent sources shrink the signal subspace of R; spatial smoothing restores
 * it (Shan, Wax & Kailath, IEEE Trans. ASSP 33(4), 1985). If MDL finds more
 * sources after forward–backward smoothing at ⌈2M/3⌉ than in the covariance
 * used, a rank deficit that smoothing fixes is likely.
 */
function coherenceCheck(
  sample: ComplexMatrix,
  fbUsed: boolean,
  n: number,
  mdlUsed: number,
  m: number,
): DoaWarning | null {
  const ls = recommendedSmoothingSubarray(m);
  const smoothed = forwardBackward(spatialSmoothing(sample, ls));
  const values = hermitianEigen(smoothed, { vectors: false }).values;
  if (!(values[0] > 0)) return null;
  const kSmoothed = sourceCountCriteria(values, n).mdlChoice;
  if (kSmoothed <= mdlUsed) return null;
  return {
    code: 'coherent-sources-suspected',
    message: `MDL finds ${mdlUsed} source(s) in the covariance used${fbUsed ? ' (forward–backward)' : ''} but ${kSmoothed} after forward–backward smoothing at subarray ${ls}: sources are probably correlated or coherent; set smoothingSubarray (about ${ls}) and forwardBackward`,
  };
}

function optionalBoolean(value: unknown, name: string): boolean {
  if (value === undefined) return false;
  if (typeof value !== 'boolean')
    throw new DoaInputError('bad-option', `${name} must be true or false, got ${String(value)}`);
  return value;
}

function checkSubarray(value: number, available: number, name: string): void {
  if (!Number.isInteger(value) || value < 2 || value > available) {
    throw new DoaInputError('bad-option', `${name} ${value} must be an integer from 2 to ${available}`);
  }
}

function checkMatrixShape(a: ComplexMatrix, name: string): void {
  if (
    !a ||
    !Number.isInteger(a.rows) ||
    !Number.isInteger(a.cols) ||
    !(a.re instanceof Float64Array) ||
    !(a.im instanceof Float64Array)
  ) {
    throw new DoaInputError('bad-size', `${name} must be a ComplexMatrix with Float64Array re and im`);
  }
  if (a.re.length !== a.rows * a.cols || a.im.length !== a.rows * a.cols) {
    throw new DoaInputError(
      'bad-size',
      `${name}: ${a.rows} × ${a.cols} needs ${a.rows * a.cols} entries, re has ${a.re.length} and im ${a.im.length}`,
    );
  }
}
