/**
 * Source count by MDL or AIC (Wax & Kailath, "Detection of signals by
 * information theoretic criteria", IEEE Trans. ASSP 33(2), 1985), exactly as
 * docs/conventions.md §3 fixes them.
 *
 * Input: the p eigenvalues of the covariance actually used, in DESCENDING
 * order, and N, the number of snapshots (1 for the single-snapshot option).
 * Eigenvalues below 1e−14 × the largest are raised to that floor. For
 * k = 0 … p−1:
 *   L_k    = N·(p−k)·[ln(arithmetic mean) − ln(geometric mean)] of the p−k smallest,
 *   MDL(k) = L_k + ½·k·(2p−k)·ln N,
 *   AIC(k) = 2·L_k + 2·k·(2p−k).
 * The chosen count minimises the criterion (the lowest k on a tie).
 */
import { DoaInputError } from '../errors';

export type SourceCountRule = 'mdl' | 'aic';

export interface SourceCountCriteria {
  /** L_k, k = 0 … p−1. */
  readonly logLikelihood: number[];
  readonly mdl: number[];
  readonly aic: number[];
  /** argmin of each curve. */
  readonly mdlChoice: number;
  readonly aicChoice: number;
}

export const EIGENVALUE_FLOOR = 1e-14;

export function sourceCountCriteria(eigenvalues: ArrayLike<number>, snapshots: number): SourceCountCriteria {
  const p = eigenvalues.length;
  if (p < 1) throw new DoaInputError('bad-size', 'source count: no eigenvalues were given');
  if (!Number.isInteger(snapshots) || snapshots < 1) {
    throw new DoaInputError('bad-value', `source count: the snapshot count ${snapshots} is not a positive integer`);
  }
  for (let i = 0; i < p; i++) {
    if (!Number.isFinite(eigenvalues[i]))
      throw new DoaInputError('not-finite', `source count: eigenvalue ${i} is ${eigenvalues[i]}`);
    if (i > 0 && eigenvalues[i] > eigenvalues[i - 1]) {
      throw new DoaInputError(
        'bad-value',
        `source count: eigenvalues must be in descending order (entry ${i} exceeds entry ${i - 1})`,
      );
    }
  }
  const largest = eigenvalues[0];
  if (!(largest > 0))
    throw new DoaInputError('bad-value', 'source count: the largest eigenvalue is not positive (all-zero data?)');
  const floor = EIGENVALUE_FLOOR * largest;
  const lambda = new Float64Array(p);
  for (let i = 0; i < p; i++) lambda[i] = Math.max(eigenvalues[i], floor);

  const logLikelihood: number[] = [];
  const mdl: number[] = [];
  const aic: number[] = [];
  const lnN = Math.log(snapshots);
  // Tail sums from the smallest eigenvalue upwards.
  let sum = 0;
  let sumLog = 0;
  const tailMeanLog = new Float64Array(p);
  const tailLogMean = new Float64Array(p);
  for (let k = p - 1; k >= 0; k--) {
    sum += lambda[k];
    sumLog += Math.log(lambda[k]);
    const count = p - k;
    tailLogMean[k] = Math.log(sum / count);
    tailMeanLog[k] = sumLog / count;
  }
  for (let k = 0; k < p; k++) {
    // ln(am) − ln(gm) ≥ 0 in exact arithmetic; rounding can make it −1e−16.
    const gap = Math.max(0, tailLogMean[k] - tailMeanLog[k]);
    const lk = snapshots * (p - k) * gap;
    logLikelihood.push(lk);
    mdl.push(mdlTerm(lk, k, p, lnN));
    aic.push(aicTerm(lk, k, p));
  }
  return { logLikelihood, mdl, aic, mdlChoice: argmin(mdl), aicChoice: argmin(aic) };
}

const mdlTerm = (lk: number, k: number, p: number, lnN: number) => lk + 0.5 * k * (2 * p - k) * lnN;
const aicTerm = (lk: number, k: number, p: number) => 2 * lk + 2 * k * (2 * p - k);

/**
 * MDL and AIC from the log-likelihood terms and the snapshot count, with the same arithmetic as
 * sourceCountCriteria (bit for bit): stored runs keep only the log-likelihood and rebuild these.
 */
export function criteriaFromLogLikelihood(logLikelihood: readonly number[], snapshots: number) {
  const p = logLikelihood.length;
  const lnN = Math.log(snapshots);
  return {
    mdl: logLikelihood.map((lk, k) => mdlTerm(lk, k, p, lnN)),
    aic: logLikelihood.map((lk, k) => aicTerm(lk, k, p)),
  };
}

export function estimateSourceCount(
  eigenvalues: ArrayLike<number>,
  snapshots: number,
  rule: SourceCountRule = 'mdl',
): number {
  if (rule !== 'mdl' && rule !== 'aic')
    throw new DoaInputError('bad-option', `source count rule "${String(rule)}" is neither "mdl" nor "aic"`);
  const c = sourceCountCriteria(eigenvalues, snapshots);
  return rule === 'mdl' ? c.mdlChoice : c.aicChoice;
}

function argmin(values: number[]): number {
  let best = 0;
  for (let i = 1; i < values.length; i++) if (values[i] < values[best]) best = i;
  return best;
}
