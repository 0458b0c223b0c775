/**
 * The ±σ of an estimate: which Cramér–Rao bound to report for a run, at the estimated bearings,
 * with the noise power and the source covariance fitted from the data.
 *
 * Conventions as crb.ts (docs/conventions.md §1, §5): bearings in degrees from broadside, d in
 * wavelengths, covariances L × L split re/im row-major, linear power units, N snapshots.
 *
 * The fit (`fitSourceCovariance`), on a covariance R of L elements and K estimated bearings:
 *  - σ² = mean of the L − K smallest eigenvalues of R (the ML noise estimate for white noise),
 *    floored at 1e−12·trace(R)/L;
 *  - Ŝ = A⁺·(R − σ²I)·A⁺ᴴ, A the L-element steering matrix at the bearings (least squares);
 *  - source powers = diag Ŝ, each raised to that floor when not above it (`raised`);
 *  - correlation coefficients ρ_ij = Ŝ_ij/√(p_i·p_j).
 *
 * The choice (`uncertaintyFromCovariance`):
 *  - The bound is always the stochastic CRB of the unprocessed data: the full M-element array and
 *    the N snapshots of the file (Stoica & Nehorai 1990). Spatial smoothing and forward–backward
 *    averaging are estimator steps; they do not change this bound, and a smoothed estimator does
 *    not in general reach it.
 *  - σ² and the powers come from the covariance the method used (as before).
 *  - Correlation is judged on the unprocessed M × M sample covariance, because smoothing and
 *    forward–backward averaging decorrelate the sources they are applied to.
 *  - "Far from diagonal" means: the largest |ρ_ij| of the fitted source covariance exceeds
 *    CORRELATED_SOURCES_THRESHOLD = 0.5. Then the full-covariance bound
 *    (`stochasticCrbFullCovariance`) is reported with P = Ŝ of the unprocessed covariance, made
 *    positive semi-definite (negative eigenvalues set to 0) and with its diagonal floored as above;
 *    otherwise the uncorrelated-source bound with P = diag(powers). For uncorrelated sources the
 *    sample |ρ| is of order 1/√N, so 0.5 is rarely crossed by chance above about 16 snapshots;
 *    at ρ = 0.5 the two bounds differ by a few per cent for well separated sources, and they
 *    differ by large factors only for strongly correlated or coherent pairs.
 *  - Single-snapshot arrangement: one snapshot cannot show correlation (its Ŝ has rank one), so
 *    the uncorrelated-source bound is reported and the basis says so.
 */
import { DoaInputError } from '../errors';
import { zeros, type ComplexMatrix } from '../linalg/complex';
import { hermitianEigen } from '../linalg/hermitian-eigen';
import { pseudoInverse } from '../linalg/pseudo-inverse';
import { RAD_PER_DEG } from '../angles';
import { stochasticCrb, stochasticCrbFullCovariance, type BoundsInput, type CrbResult } from './crb';

/** Largest |correlation coefficient| between fitted sources above which the full-P bound is used. */
export const CORRELATED_SOURCES_THRESHOLD = 0.5;

export interface SourceCovarianceFit {
  noisePower: number;
  /** Ŝ = A⁺·(R − σ²I)·A⁺ᴴ, K × K Hermitian, as fitted (not projected, not floored). */
  sourceCovariance: ComplexMatrix;
  /** diag Ŝ, each at least the floor 1e−12·trace(R)/L. */
  sourcePowers: number[];
  /** Some power was raised to the floor. */
  raised: boolean;
  /** max over i ≠ j of |Ŝ_ij|/√(p_i·p_j) with the floored powers, capped at 1; 0 when K < 2. */
  maxCorrelation: number;
}

function steeringMatrix(
  l: number,
  d: number,
  bearingsDeg: ArrayLike<number>,
  positions?: ArrayLike<number>,
): ComplexMatrix {
  const k = bearingsDeg.length;
  const a = zeros(l, k);
  for (let c = 0; c < k; c++) {
    const mu = 2 * Math.PI * d * Math.sin(bearingsDeg[c] * RAD_PER_DEG);
    for (let m = 0; m < l; m++) {
      const p = positions ? positions[m] : m;
      a.re[m * k + c] = Math.cos(mu * p);
      a.im[m * k + c] = Math.sin(mu * p);
    }
  }
  return a;
}

/**
 * Fits σ² and the source covariance Ŝ at the given bearings (see the header). `eigenvalues` are
 * those of `r`, descending (computed when omitted); `noisePower` overrides the eigenvalue fit.
 */
export function fitSourceCovariance(
  r: ComplexMatrix,
  bearingsDeg: ArrayLike<number>,
  spacingWavelengths: number,
  options: {
    eigenvalues?: ArrayLike<number>;
    noisePower?: number;
    /** Positions of the rows of R in units of d (a line with gaps); default 0 … L−1. */
    positions?: ArrayLike<number>;
  } = {},
): SourceCovarianceFit {
  const l = r.rows;
  const k = bearingsDeg.length;
  if (r.cols !== l) throw new DoaInputError('bad-size', `covariance is ${r.rows} × ${r.cols}, not square`);
  if (options.positions && options.positions.length !== l)
    throw new DoaInputError('bad-size', `positions has ${options.positions.length} entries for a ${l}-row covariance`);
  if (k < 1 || k >= l)
    throw new DoaInputError('bad-source-count', `${k} bearing(s) for a ${l}-element covariance: need 1 ≤ K < L`);
  let trace = 0;
  for (let i = 0; i < l; i++) trace += r.re[i * l + i];
  const floor = (1e-12 * trace) / l;
  let noisePower = options.noisePower;
  if (noisePower === undefined) {
    const ev = options.eigenvalues ?? hermitianEigen(r, { vectors: false }).values;
    let sum = 0;
    for (let i = k; i < l; i++) sum += ev[i];
    noisePower = sum / Math.max(1, l - k);
  }
  if (!(noisePower > floor)) noisePower = floor;
  const ap = pseudoInverse(steeringMatrix(l, spacingWavelengths, bearingsDeg, options.positions)); // K × L
  // T = (R − σ²I)·A⁺ᴴ (L × K), then Ŝ = A⁺·T.
  const t = zeros(l, k);
  for (let i = 0; i < l; i++) {
    for (let q = 0; q < k; q++) {
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
      t.re[i * k + q] = tr;
      t.im[i * k + q] = ti;
    }
  }
  const s = zeros(k, k);
  for (let p = 0; p < k; p++) {
    for (let q = 0; q < k; q++) {
      let sr = 0;
      let si = 0;
      for (let i = 0; i < l; i++) {
        const ar = ap.re[p * l + i];
        const ai = ap.im[p * l + i];
        sr += ar * t.re[i * k + q] - ai * t.im[i * k + q];
        si += ar * t.im[i * k + q] + ai * t.re[i * k + q];
      }
      s.re[p * k + q] = sr;
      s.im[p * k + q] = si;
    }
  }
  // exactly Hermitian
  for (let p = 0; p < k; p++) {
    s.im[p * k + p] = 0;
    for (let q = p + 1; q < k; q++) {
      const re = 0.5 * (s.re[p * k + q] + s.re[q * k + p]);
      const im = 0.5 * (s.im[p * k + q] - s.im[q * k + p]);
      s.re[p * k + q] = re;
      s.re[q * k + p] = re;
      s.im[p * k + q] = im;
      s.im[q * k + p] = -im;
    }
  }
  const sourcePowers: number[] = [];
  let raised = false;
  for (let p = 0; p < k; p++) {
    let v = s.re[p * k + p];
    if (!(v > floor)) {
      v = floor;
      raised = true;
    }
    sourcePowers.push(v);
  }
  let maxCorrelation = 0;
  for (let p = 0; p < k; p++)
    for (let q = p + 1; q < k; q++) {
      const rho = Math.hypot(s.re[p * k + q], s.im[p * k + q]) / Math.sqrt(sourcePowers[p] * sourcePowers[q]);
      maxCorrelation = Math.max(maxCorrelation, Math.min(1, rho));
    }
  return { noisePower, sourceCovariance: s, sourcePowers, raised, maxCorrelation };
}

/** Ŝ made positive semi-definite (negative eigenvalues to 0) with its diagonal at least `floor`. */
function projectedSourceCovariance(s: ComplexMatrix, floor: number): ComplexMatrix {
  const k = s.rows;
  const eig = hermitianEigen(s);
  const out = zeros(k, k);
  for (let e = 0; e < k; e++) {
    const lambda = Math.max(0, eig.values[e]);
    if (lambda === 0) continue;
    for (let i = 0; i < k; i++) {
      const vir = eig.vectors.re[i * k + e];
      const vii = eig.vectors.im[i * k + e];
      for (let j = 0; j < k; j++) {
        const vjr = eig.vectors.re[j * k + e];
        const vji = -eig.vectors.im[j * k + e];
        out.re[i * k + j] += lambda * (vir * vjr - vii * vji);
        out.im[i * k + j] += lambda * (vir * vji + vii * vjr);
      }
    }
  }
  for (let i = 0; i < k; i++) {
    out.im[i * k + i] = 0;
    if (!(out.re[i * k + i] > floor)) out.re[i * k + i] = floor;
    for (let j = i + 1; j < k; j++) {
      const re = 0.5 * (out.re[i * k + j] + out.re[j * k + i]);
      const im = 0.5 * (out.im[i * k + j] - out.im[j * k + i]);
      out.re[i * k + j] = re;
      out.re[j * k + i] = re;
      out.im[i * k + j] = im;
      out.im[j * k + i] = -im;
    }
  }
  return out;
}

export type ReportedBound = 'stochastic-uncorrelated' | 'stochastic-full-covariance';

export interface UncertaintyInput {
  /** M, the full array (the bound is for the unprocessed data). */
  elements: number;
  spacingWavelengths: number;
  /** N, the snapshots of the data. */
  snapshots: number;
  /** Estimated bearings, degrees, distinct and strictly inside (−90, 90). */
  bearingsDeg: ArrayLike<number>;
  /** The covariance the method used (L × L, after arrangement, smoothing, forward–backward). */
  usedCovariance: ComplexMatrix;
  /** Its eigenvalues, descending (computed when omitted). */
  usedEigenvalues?: ArrayLike<number>;
  /**
   * The unprocessed M × M sample covariance, to judge correlation. Omit it when it is the used
   * covariance (no smoothing, no forward–backward, no single-snapshot arrangement).
   */
  sampleCovariance?: ComplexMatrix;
  processing?: { forwardBackward?: boolean; smoothingSubarray?: number; singleSnapshot?: boolean };
  /** Default CORRELATED_SOURCES_THRESHOLD. */
  correlationThreshold?: number;
  /**
   * A line with disabled elements: the elements of the bound (0-based on the line of `elements`,
   * docs/conventions.md §9). `sampleCovariance` is then that of these elements. Default: all.
   */
  elementIndices?: readonly number[];
  /** Positions (units of d) of the rows of `usedCovariance`; default 0 … L−1 (a contiguous run or the full line). */
  usedPositions?: readonly number[];
}

export interface RunUncertainty {
  crb: CrbResult;
  bound: ReportedBound;
  noisePower: number;
  /** Powers of the used-covariance fit (diag P of the uncorrelated bound). */
  sourcePowers: number[];
  powersRaised: boolean;
  /** Largest |ρ_ij| of the unprocessed fit; null when not judged (K = 1 or single snapshot). */
  maxSourceCorrelation: number | null;
  /** The P of the full-covariance bound (K × K), or null with the uncorrelated bound. */
  sourceCovariance: ComplexMatrix | null;
  /** The diagonal bound input (for pair verdicts and re-evaluation). */
  boundsInput: BoundsInput;
  /** One sentence naming the bound, its data and the processing. */
  basis: string;
}

/** Decides the bound for a run (uncorrelated vs full source covariance) and evaluates it; see the header. */
export function uncertaintyFromCovariance(input: UncertaintyInput): RunUncertainty {
  const { elements, spacingWavelengths: d, snapshots, bearingsDeg } = input;
  const k = bearingsDeg.length;
  const threshold = input.correlationThreshold ?? CORRELATED_SOURCES_THRESHOLD;
  if (!(threshold >= 0 && threshold <= 1))
    throw new DoaInputError('bad-option', `correlationThreshold must lie in [0, 1], got ${threshold}`);
  const proc = input.processing ?? {};
  const used = fitSourceCovariance(input.usedCovariance, bearingsDeg, d, {
    eigenvalues: input.usedEigenvalues,
    ...(input.usedPositions ? { positions: input.usedPositions } : {}),
  });
  const indices = input.elementIndices && input.elementIndices.length < elements ? input.elementIndices : undefined;
  const boundsInput: BoundsInput = {
    elements,
    spacingWavelengths: d,
    bearingsDeg: Array.from(bearingsDeg),
    sourcePowers: used.sourcePowers,
    noisePower: used.noisePower,
    snapshots,
    ...(indices ? { elementIndices: indices.slice() } : {}),
  };
  const receivers = indices
    ? `the ${indices.length} enabled elements of a ${elements}-element line at their true positions`
    : `${elements} elements`;
  const steps: string[] = [];
  if (proc.singleSnapshot) steps.push('the single-snapshot arrangement');
  if (proc.smoothingSubarray !== undefined) steps.push(`spatial smoothing (L = ${proc.smoothingSubarray})`);
  if (proc.forwardBackward) steps.push('forward–backward averaging');
  const processed = steps.length > 0;
  const noteProcessing = processed
    ? ` The estimate used ${steps.join(' and ')}; the bound is that of the unprocessed data, which a smoothed or averaged estimator does not in general reach.`
    : '';
  const fitText = `σ² = mean of the ${input.usedCovariance.rows - k} smallest eigenvalues of the covariance used, powers by least squares`;

  let maxSourceCorrelation: number | null = null;
  let fullP: ComplexMatrix | null = null;
  if (k >= 2 && !proc.singleSnapshot) {
    const raw = input.sampleCovariance ?? (processed ? null : input.usedCovariance);
    if (raw) {
      const rawFit =
        raw === input.usedCovariance
          ? used
          : fitSourceCovariance(raw, bearingsDeg, d, {
              noisePower: used.noisePower,
              ...(indices ? { positions: indices } : {}),
            });
      maxSourceCorrelation = rawFit.maxCorrelation;
      if (rawFit.maxCorrelation > threshold) {
        let trace = 0;
        for (let i = 0; i < raw.rows; i++) trace += raw.re[i * raw.rows + i];
        fullP = projectedSourceCovariance(rawFit.sourceCovariance, (1e-12 * trace) / raw.rows);
      }
    }
  }
  if (fullP) {
    const crb = stochasticCrbFullCovariance({
      elements,
      spacingWavelengths: d,
      bearingsDeg,
      sourceCovariance: fullP,
      noisePower: used.noisePower,
      snapshots,
      ...(indices ? { elementIndices: indices } : {}),
    });
    return {
      crb,
      bound: 'stochastic-full-covariance',
      noisePower: used.noisePower,
      sourcePowers: used.sourcePowers,
      powersRaised: used.raised,
      maxSourceCorrelation,
      sourceCovariance: fullP,
      boundsInput,
      basis:
        `stochastic CRB with the full source covariance (Stoica & Nehorai 1990) for ${receivers} and ${snapshots} snapshot(s) at the estimated bearings: ` +
        `the fitted sources are correlated (largest |ρ| = ${maxSourceCorrelation!.toFixed(2)} > ${threshold}), P fitted by least squares on the unprocessed covariance; ${fitText}.` +
        noteProcessing,
    };
  }
  const crb = stochasticCrb(boundsInput);
  const why =
    maxSourceCorrelation === null
      ? k < 2
        ? ''
        : proc.singleSnapshot
          ? ' (one snapshot cannot show source correlation)'
          : ' (correlation not judged: no unprocessed covariance given)'
      : ` (largest fitted |ρ| = ${maxSourceCorrelation.toFixed(2)} ≤ ${threshold})`;
  return {
    crb,
    bound: 'stochastic-uncorrelated',
    noisePower: used.noisePower,
    sourcePowers: used.sourcePowers,
    powersRaised: used.raised,
    maxSourceCorrelation,
    sourceCovariance: null,
    boundsInput,
    basis:
      `stochastic CRB for uncorrelated sources${why} for ${receivers} and ${snapshots} snapshot(s) at the estimated bearings; ${fitText}.` +
      noteProcessing,
  };
}
