/**
 * Resolvability verdict of every source pair: the Rayleigh gap test of docs/conventions.md §5
 * (|sin θi − sin θj| < 1/(M·d)) together with Smith's statistical criterion (resolution.ts)
 * at the given powers, noise and snapshot count.
 */
import { RAD_PER_DEG } from '../angles';
import { checkBoundsInput, crbFromChecked, requireBoundKind, type BoundKind, type BoundsInput } from './crb';
import { SMITH_CRITERION, statisticalResolutionLimit } from './resolution';

export type PairVerdict = 'resolvable' | 'needs-high-resolution' | 'unresolvable';

export interface PairResolvability {
  i: number;
  j: number;
  /** |θj − θi|, degrees. */
  separationDeg: number;
  /** |sin θi − sin θj|. */
  separationU: number;
  /** 1/(M·d). */
  rayleighGapU: number;
  /** docs/conventions.md §5: separationU < 1/(M·d). */
  belowResolvableGap: boolean;
  /** √(C_ii + C_jj − 2C_ij) of the full K-source bound at the given bearings, degrees. */
  separationStdDeg: number;
  /** Smith's limit for this pair alone, centred at its midpoint, with its two powers (degrees; null if none in view). */
  statisticalLimitDeg: number | null;
  statisticalLimitU: number | null;
  /** Smith's criterion at the given bearings: separation < √CRB(separation). */
  belowStatisticalLimit: boolean;
  /**
   * 'resolvable': above the Rayleigh gap and above the statistical limit;
   * 'needs-high-resolution': below the Rayleigh gap (a beamformer merges them) but
   *   above the statistical limit (subspace methods may separate them at this SNR and N);
   * 'unresolvable': below the statistical limit; no unbiased method can be expected to separate them.
   */
  verdict: PairVerdict;
  criterion: 'Smith (2005): δ = √(C11 + C22 − 2·C12)';
}

/** Resolvability of every source pair (i < j, 0-based indices into bearingsDeg). */
export function pairResolvability(input: BoundsInput, options: { bound?: BoundKind } = {}): PairResolvability[] {
  const c = checkBoundsInput(input);
  const kind = requireBoundKind(options.bound ?? 'stochastic');
  const crb = crbFromChecked(c, kind);
  const k = crb.sources;
  const gapU = 1 / (c.m * c.d);
  const out: PairResolvability[] = [];
  for (let i = 0; i < k; i++) {
    for (let j = i + 1; j < k; j++) {
      const sepRad = Math.abs(c.theta[j] - c.theta[i]);
      const sepU = Math.abs(Math.sin(c.theta[i]) - Math.sin(c.theta[j]));
      const v = crb.covarianceRad2[i * k + i] + crb.covarianceRad2[j * k + j] - 2 * crb.covarianceRad2[i * k + j];
      const sepStd = Math.sqrt(Math.max(0, v));
      const limit = statisticalResolutionLimit({
        elements: c.m,
        spacingWavelengths: c.d,
        centerDeg: (c.theta[i] + c.theta[j]) / 2 / RAD_PER_DEG,
        sourcePowers: [c.powers[i], c.powers[j]],
        noisePower: c.noise,
        snapshots: c.n,
        bound: kind,
      });
      const belowGap = sepU < gapU;
      const belowStat = sepRad < sepStd;
      out.push({
        i,
        j,
        separationDeg: sepRad / RAD_PER_DEG,
        separationU: sepU,
        rayleighGapU: gapU,
        belowResolvableGap: belowGap,
        separationStdDeg: sepStd / RAD_PER_DEG,
        statisticalLimitDeg: limit.deltaDeg,
        statisticalLimitU: limit.deltaU,
        belowStatisticalLimit: belowStat,
        verdict: belowStat ? 'unresolvable' : belowGap ? 'needs-high-resolution' : 'resolvable',
        criterion: SMITH_CRITERION,
      });
    }
  }
  return out;
}
