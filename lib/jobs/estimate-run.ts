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
 * - The stochastic CRB (Stoica & Nehorai 1990, uncorrelated sources) is then
 *   evaluated for the full M-element array with the N snapshots of the data
 *   (lib/doa stochasticCrb). For coherent sources that bound is only indicative.
 * - 95% interval = estimate ± 1.96σ (Gaussian approximation; the CRB bounds
 *   unbiased estimators and is reached only asymptotically, docs/references.md §11).
 */
import {
  estimateBearings,
  forwardBackward,
  hermitianEigen,
  pairResolvability,
  pseudoInverse,
  sampleCovarianceFromRows,
  spatialSmoothing,
  stochasticCrb,
  defaultSingleSnapshotSubarray,
  type ComplexMatrix,
  type DoaMethod,
  type EstimateBearingsResult,
  type PairResolvability,
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
}

export const CI95_FACTOR = 1.96;

/** The covariance the engine uses for these options (L × L). */
export function usedCovariance(rows: ComplexMatrix, options: RunOptions): ComplexMatrix {
  let r = sampleCovarianceFromRows(rows);
  if (options.singleSnapshot)
    r = spatialSmoothing(r, options.singleSnapshotSubarray ?? defaultSingleSnapshotSubarray(rows.cols));
  if (options.smoothingSubarray !== undefined) r = spatialSmoothing(r, options.smoothingSubarray);
  if (options.forwardBackward) r = forwardBackward(r);
  return r;
}

function steering(l: number, d: number, bearingsDeg: number[]): ComplexMatrix {
  const k = bearingsDeg.length;
  const re = new Float64Array(l * k);
  const im = new Float64Array(l * k);
  for (let c = 0; c < k; c++) {
    const mu = 2 * Math.PI * d * Math.sin((bearingsDeg[c] * Math.PI) / 180);
    for (let m = 0; m < l; m++) {
      re[m * k + c] = Math.cos(mu * m);
      im[m * k + c] = Math.sin(mu * m);
    }
  }
  return { rows: l, cols: k, re, im };
}

/** σ² and source powers from the used covariance at the estimated bearings (see the header). */
export function fitPowers(
  r: ComplexMatrix,
  eigenvalues: number[],
  bearingsDeg: number[],
  d: number,
): { noisePower: number; sourcePowers: number[]; raised: boolean } {
  const l = r.rows;
  const k = bearingsDeg.length;
  const tail = eigenvalues.slice(k);
  let noisePower = tail.reduce((a, b) => a + b, 0) / Math.max(1, tail.length);
  let trace = 0;
  for (let i = 0; i < l; i++) trace += r.re[i * l + i];
  const floor = (1e-12 * trace) / l;
  if (!(noisePower > floor)) noisePower = floor;
  const a = steering(l, d, bearingsDeg);
  const ap = pseudoInverse(a); // K × L
  // S = A⁺ (R − σ²I) A⁺ᴴ, only the diagonal: s_kk = Σ_ij ap[k,i] (R−σ²I)[i,j] conj(ap[k,j]).
  const sourcePowers: number[] = [];
  let raised = false;
  for (let q = 0; q < k; q++) {
    let acc = 0;
    for (let i = 0; i < l; i++) {
      // t = Σ_j (R−σ²I)[i,j]·conj(ap[q,j])
      let tr = 0;
      let ti = 0;
      for (let j = 0; j < l; j++) {
        const rr = r.re[i * l + j] - (i === j ? noisePower : 0);
        const ri = r.im[i * l + j];
        const pr = ap.re[q * l + j];
        const pi = -ap.im[q * l + j];
        tr += rr * pr - ri * pi;
        ti += rr * pi + ri * pr;
      }
      const ar = ap.re[q * l + i];
      const ai = ap.im[q * l + i];
      acc += ar * tr - ai * ti;
    }
    if (!(acc > floor)) {
      acc = floor;
      raised = true;
    }
    sourcePowers.push(acc);
  }
  return { noisePower, sourcePowers, raised };
}

/** Runs one method with its uncertainty and pair flags. */
export function runMethod({
  rows,
  elements,
  spacingWavelengths,
  method,
  options,
  covariance,
}: {
  rows: ComplexMatrix;
  elements: number;
  spacingWavelengths: number;
  method: DoaMethod;
  options: RunOptions;
  covariance?: ComplexMatrix;
}): MethodResult {
  const t0 = performance.now();
  const res = estimateBearings({ rows, spacingWavelengths, method, ...options });
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
      const r = covariance ?? usedCovariance(rows, options);
      const fit = fitPowers(r, res.eigenvalues, b, spacingWavelengths);
      const input = {
        elements,
        spacingWavelengths,
        bearingsDeg: b,
        sourcePowers: fit.sourcePowers,
        noisePower: fit.noisePower,
        snapshots: rows.rows,
      };
      const crb = stochasticCrb(input);
      const std = Array.from(crb.stdDeg);
      out.uncertainty = {
        crbStdDeg: std,
        ci95Deg: b.map((x, i) => [x - CI95_FACTOR * std[i], x + CI95_FACTOR * std[i]] as [number, number]),
        sourcePowers: fit.sourcePowers,
        noisePower: fit.noisePower,
        powersRaised: fit.raised,
        basis: `stochastic CRB for ${elements} elements and ${rows.rows} snapshot(s) at the estimated bearings; σ² = mean of the ${res.effectiveElements - b.length} smallest eigenvalues, powers by least squares`,
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
