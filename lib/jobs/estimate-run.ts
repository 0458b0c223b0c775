/**
 * The computation of one estimate run, without I/O: several methods on the
 * same snapshots, each with its ±1σ Cramér–Rao uncertainty and the
 * resolvability of every estimated pair. Plain TypeScript on lib/doa.
 *
 * Layout: `rows` is N × M, one snapshot per row (the file layout), split re/im,
 * row-major (docs/conventions.md §2, lib/doa/complex.ts). Bearings in degrees from
 * broadside; spacing d in wavelengths.
 *
 * Uncertainty at the estimated parameters (the choice, documented):
 * - The covariance actually used is rebuilt as the engine builds it
 *   (single-snapshot arrangement or sample covariance → smoothing →
 *   forward–backward), L × L.
 * - Noise power σ² = mean of its L − K smallest eigenvalues (the ML noise
 *   estimate for a white-noise model).
 * - Source powers by least squares on the signal part: P̂ = diag(A⁺·(R − σ²I)·A⁺ᴴ)
 *   with A the L-element steering matrix at the estimated bearings; a
 *   negative or zero fit is raised to 1e−12·trace(R)/L (and flagged).
 * - The stochastic CRB (Stoica & Nehorai 1990) is then evaluated for the full
 *   M-element array with the N snapshots of the data: for uncorrelated sources, or
 *   with the full fitted source covariance when the sources are far from
 *   uncorrelated (lib/doa uncertaintyFromCovariance, which defines "far" and
 *   names the bound in `basis` and `bound`).
 * - 95% interval = estimate ± 1.96σ (Gaussian approximation; the CRB bounds
 *   unbiased estimators and is reached only asymptotically, docs/references.md §11).
 */
import {
  estimateBearings,
  forwardBackward,
  hermitianEigen,
  pairResolvability,
  sampleCovarianceFromRows,
  spatialSmoothing,
  uncertaintyFromCovariance,
  fitSourceCovariance,
  defaultSingleSnapshotSubarray,
  type ComplexMatrix,
  type DoaMethod,
  type EstimateBearingsResult,
  type PairResolvability,
  type ReportedBound,
  describeSubsetCost,
  selectElements,
  subsetCrbCost,
  type ElementSelectionKind,
  criteriaFromLogLikelihood,
} from '../doa';

export interface RunOptions {
  sourceCount?: number;
  sourceCountRule?: 'mdl' | 'aic';
  forwardBackward?: boolean;
  smoothingSubarray?: number;
  singleSnapshot?: boolean;
  singleSnapshotSubarray?: number;
  includeSpectrum?: boolean;
}

export interface Uncertainty {
  crbStdDeg: number[];
  ci95Deg: Array<[number, number]>;
  sourcePowers: number[];
  noisePower: number;
  powersRaised: boolean;
  basis: string;
  /** Which bound the ±σ is (lib/doa uncertaintyFromCovariance); absent in runs stored before it. */
  bound?: ReportedBound;
  /** Largest |correlation| of the fitted sources (null: not judged). */
  maxSourceCorrelation?: number | null;
}

/** The part of the engine's pair verdict a run stores. */
export type PairFlag = Pick<
  PairResolvability,
  'i' | 'j' | 'separationDeg' | 'separationU' | 'rayleighGapU' | 'belowResolvableGap' | 'verdict'
>;

export interface MethodResult {
  method: DoaMethod;
  sourceCount: number;
  sourceCountRule: 'given' | 'mdl' | 'aic';
  bearingsDeg: number[];
  eigenvalues: number[];
  warnings: { code: string; message: string }[];
  spectrum?: { kind: string; startDeg: number; stepDeg: number; valuesDb: (number | null)[] };
  effectiveElements: number;
  criteria: EstimateBearingsResult['criteria'];
  uncertainty: Uncertainty | null;
  uncertaintyNote?: string;
  pairs: PairFlag[];
  elapsedMs: number;
  /** Which elements the method used on a line with disabled elements (0-based on the full line). */
  elementSelection?: { kind: ElementSelectionKind; indices: number[]; lineElements: number };
}

/** The columns `indices` of an N × M matrix (file layout). */
export function pickColumns(rows: ComplexMatrix, indices: readonly number[]): ComplexMatrix {
  const l = indices.length;
  const re = new Float64Array(rows.rows * l);
  const im = new Float64Array(rows.rows * l);
  for (let r = 0; r < rows.rows; r++) {
    for (let i = 0; i < l; i++) {
      re[r * l + i] = rows.re[r * rows.cols + indices[i]];
      im[r * l + i] = rows.im[r * rows.cols + indices[i]];
    }
  }
  return { rows: rows.rows, cols: l, re, im };
}

export const CI95_FACTOR = 1.96;

/** The covariance the engine uses for these options (L × L); `sample` is X·Xᴴ/N when already known. */
export function usedCovariance(rows: ComplexMatrix, options: RunOptions, sample?: ComplexMatrix): ComplexMatrix {
  let r = sample ?? sampleCovarianceFromRows(rows);
  if (options.singleSnapshot)
    r = spatialSmoothing(r, options.singleSnapshotSubarray ?? defaultSingleSnapshotSubarray(rows.cols));
  if (options.smoothingSubarray !== undefined) r = spatialSmoothing(r, options.smoothingSubarray);
  if (options.forwardBackward) r = forwardBackward(r);
  return r;
}

/** σ² and source powers from the used covariance at the estimated bearings (lib/doa fitSourceCovariance). */
export function fitPowers(
  r: ComplexMatrix,
  eigenvalues: number[],
  bearingsDeg: number[],
  d: number,
): { noisePower: number; sourcePowers: number[]; raised: boolean } {
  const fit = fitSourceCovariance(r, bearingsDeg, d, { eigenvalues });
  return { noisePower: fit.noisePower, sourcePowers: fit.sourcePowers, raised: fit.raised };
}

/** Runs one method with its uncertainty and pair flags. */
export function runMethod({
  rows,
  elements,
  spacingWavelengths,
  method,
  options,
  covariance,
  sampleCovariance,
  enabledIndices,
}: {
  rows: ComplexMatrix;
  elements: number;
  spacingWavelengths: number;
  method: DoaMethod;
  options: RunOptions;
  covariance?: ComplexMatrix;
  /** The unprocessed M × M sample covariance (computed here when a processed run needs it and it is absent). */
  sampleCovariance?: ComplexMatrix;
  /**
   * The enabled elements (0-based, ascending) of a line with disabled elements; default all.
   * `covariance` and `sampleCovariance` are then ignored (each method has its own elements).
   */
  enabledIndices?: readonly number[];
}): MethodResult {
  const t0 = performance.now();
  const selection =
    enabledIndices && enabledIndices.length < elements
      ? selectElements(method, enabledIndices, elements, options)
      : undefined;
  const res = estimateBearings({
    rows,
    spacingWavelengths,
    method,
    ...options,
    // The full line's sample covariance does not apply to a subset of its elements.
    ...(selection ? { elementIndices: selection.enabled } : sampleCovariance ? { sampleCovariance } : {}),
  });
  const out: MethodResult = {
    method: res.method,
    sourceCount: res.sourceCount,
    sourceCountRule: res.sourceCountRule,
    bearingsDeg: res.bearingsDeg,
    eigenvalues: res.eigenvalues,
    warnings: res.warnings.map((w) => ({ code: w.code, message: w.message })),
    effectiveElements: res.effectiveElements,
    criteria: res.criteria,
    uncertainty: null,
    pairs: [],
    elapsedMs: 0,
    ...(res.elementSelection ? { elementSelection: res.elementSelection } : {}),
  };
  if (res.spectrum) {
    out.spectrum = {
      kind: res.spectrum.kind,
      startDeg: res.spectrum.startDeg,
      stepDeg: res.spectrum.stepDeg,
      valuesDb: Array.from(res.spectrum.valuesDb, (v) => (Number.isFinite(v) ? v : null)),
    };
  }
  const b = res.bearingsDeg;
  const distinct = b.every((x, i) => i === 0 || x - b[i - 1] > 1e-9);
  const inside = b.every((x) => x > -90 && x < 90);
  if (b.length === 0) {
    out.uncertaintyNote = 'No sources were estimated, so there is no bound to show.';
  } else if (!distinct || !inside) {
    out.uncertaintyNote = !distinct
      ? 'Two estimated bearings coincide; the bound is not defined there.'
      : 'A bearing at ±90° (end-fire) has no finite bound.';
  } else {
    try {
      const processed = options.forwardBackward || options.smoothingSubarray !== undefined;
      let u: ReturnType<typeof uncertaintyFromCovariance>;
      if (selection) {
        // A line with disabled elements: the bound is that of the enabled elements at their true
        // positions (docs/conventions.md §9); σ² and the powers come from the elements the method used.
        const enabledRows = pickColumns(rows, selection.enabled);
        const usedRows =
          selection.kind === 'longest-contiguous-run' ? pickColumns(rows, selection.indices) : enabledRows;
        const first = selection.indices[0];
        u = uncertaintyFromCovariance({
          elements,
          spacingWavelengths,
          snapshots: rows.rows,
          bearingsDeg: b,
          usedCovariance: usedCovariance(usedRows, options),
          usedEigenvalues: res.eigenvalues,
          ...(selection.kind === 'enabled-true-positions'
            ? { usedPositions: selection.indices.map((i) => i - first) }
            : {}),
          elementIndices: selection.enabled,
          sampleCovariance:
            options.singleSnapshot || (!processed && selection.kind === 'enabled-true-positions')
              ? undefined
              : sampleCovarianceFromRows(enabledRows),
          processing: options,
        });
        const cost = subsetCrbCost({
          spacingWavelengths,
          bearingsDeg: b,
          sourcePowers: u.sourcePowers,
          noisePower: u.noisePower,
          snapshots: rows.rows,
          selection,
        });
        const note = out.warnings.find((w) => w.code === 'element-subset');
        if (note) note.message = `${note.message} ${describeSubsetCost(selection, cost)}`;
      } else {
        const r = covariance ?? usedCovariance(rows, options);
        u = uncertaintyFromCovariance({
          elements,
          spacingWavelengths,
          snapshots: rows.rows,
          bearingsDeg: b,
          usedCovariance: r,
          usedEigenvalues: res.eigenvalues,
          sampleCovariance:
            processed && !options.singleSnapshot ? (sampleCovariance ?? sampleCovarianceFromRows(rows)) : undefined,
          processing: options,
        });
      }
      const input = u.boundsInput;
      const std = Array.from(u.crb.stdDeg);
      out.uncertainty = {
        crbStdDeg: std,
        ci95Deg: b.map((x, i) => [x - CI95_FACTOR * std[i], x + CI95_FACTOR * std[i]] as [number, number]),
        sourcePowers: u.sourcePowers,
        noisePower: u.noisePower,
        powersRaised: u.powersRaised,
        basis: u.basis,
        bound: u.bound,
        maxSourceCorrelation: u.maxSourceCorrelation,
      };
      if (b.length >= 2) {
        out.pairs = pairResolvability(input).map((p) => ({
          i: p.i,
          j: p.j,
          separationDeg: p.separationDeg,
          separationU: p.separationU,
          rayleighGapU: p.rayleighGapU,
          belowResolvableGap: p.belowResolvableGap,
          verdict: p.verdict,
        }));
      }
    } catch (err) {
      out.uncertaintyNote = `The bound could not be evaluated: ${(err as Error).message}`;
    }
  }
  out.elapsedMs = performance.now() - t0;
  return out;
}

export function eigenvaluesOf(r: ComplexMatrix): number[] {
  return Array.from(hermitianEigen(r, { vectors: false }).values);
}

/**
 * A method result as a run row stores it: without what the rest rebuilds exactly (MDL and AIC
 * from the log-likelihood and the snapshot count, the 95% interval from the bearings and σ), so
 * an inline run's row stays small. `expandStoredResult` gives back the full result bit for bit
 * (tests/lib/jobs/stored-result.test.ts); rows stored in full are returned as they are.
 */
export type StoredMethodResult = Omit<MethodResult, 'criteria' | 'uncertainty' | 'spectrum'> & {
  criteria: Omit<MethodResult['criteria'], 'mdl' | 'aic'> & Partial<Pick<MethodResult['criteria'], 'mdl' | 'aic'>>;
  uncertainty: (Omit<Uncertainty, 'ci95Deg'> & { ci95Deg?: Uncertainty['ci95Deg'] }) | null;
  spectrum?: MethodResult['spectrum'] | StoredSpectrum;
};

/**
 * A spectrum as a run row stores it: the dB values as one base64 string of little-endian
 * float64 (NaN where the result has null), exact, instead of an array of numbers. For the
 * default 18001-point grid that is 192 KB of text in place of about 360 KB, and writing and
 * reading it costs a byte copy rather than 18001 number conversions (in the worker, in
 * Postgres's JSONB parser and in every reader).
 */
export interface StoredSpectrum {
  kind: string;
  startDeg: number;
  stepDeg: number;
  valuesF64: string;
}

function packSpectrum(s: NonNullable<MethodResult['spectrum']>): StoredSpectrum {
  const bytes = new Uint8Array(8 * s.valuesDb.length);
  const view = new DataView(bytes.buffer);
  s.valuesDb.forEach((v, i) => view.setFloat64(8 * i, v === null ? NaN : v, true));
  return {
    kind: s.kind,
    startDeg: s.startDeg,
    stepDeg: s.stepDeg,
    valuesF64: Buffer.from(bytes.buffer).toString('base64'),
  };
}

function unpackSpectrum(s: StoredSpectrum): NonNullable<MethodResult['spectrum']> {
  const bytes = Buffer.from(s.valuesF64, 'base64');
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const valuesDb: (number | null)[] = new Array(bytes.byteLength >> 3);
  for (let i = 0; i < valuesDb.length; i++) {
    const v = view.getFloat64(8 * i, true);
    valuesDb[i] = Number.isNaN(v) ? null : v;
  }
  return { kind: s.kind, startDeg: s.startDeg, stepDeg: s.stepDeg, valuesDb };
}

export function compactStoredResult(r: MethodResult): StoredMethodResult {
  const { mdl: _mdl, aic: _aic, ...criteria } = r.criteria;
  void _mdl;
  void _aic;
  let uncertainty: StoredMethodResult['uncertainty'] = r.uncertainty;
  if (r.uncertainty) {
    const { ci95Deg: _ci, ...rest } = r.uncertainty;
    void _ci;
    uncertainty = rest;
  }
  if (!r.spectrum) return { ...r, criteria, uncertainty };
  return { ...r, criteria, uncertainty, spectrum: packSpectrum(r.spectrum) };
}

export function expandStoredResult(r: StoredMethodResult): MethodResult {
  let criteria = r.criteria as MethodResult['criteria'];
  if (criteria && Array.isArray(criteria.logLikelihood) && (!criteria.mdl || !criteria.aic)) {
    const { mdl, aic } = criteriaFromLogLikelihood(criteria.logLikelihood, criteria.snapshotsUsed);
    criteria = { logLikelihood: criteria.logLikelihood, mdl, aic, snapshotsUsed: criteria.snapshotsUsed };
  }
  let uncertainty = r.uncertainty as Uncertainty | null;
  if (uncertainty && !uncertainty.ci95Deg) {
    const std = uncertainty.crbStdDeg;
    const ci95Deg = r.bearingsDeg.map(
      (x, i) => [x - CI95_FACTOR * std[i], x + CI95_FACTOR * std[i]] as [number, number],
    );
    // The key order of a freshly computed result (ci95Deg second).
    const { crbStdDeg, ci95Deg: _absent, ...rest } = uncertainty;
    void _absent;
    uncertainty = { crbStdDeg, ci95Deg, ...rest };
  }
  if (r.spectrum && 'valuesF64' in r.spectrum) {
    return { ...r, criteria, uncertainty, spectrum: unpackSpectrum(r.spectrum) } as MethodResult;
  }
  return { ...r, criteria, uncertainty } as MethodResult;
}
