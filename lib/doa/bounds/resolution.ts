/**
 * Statistical resolution limit of two sources (Smith 2005, IEEE Trans. SP 53(5):1597–1609):
 * two sources are resolvable when their separation δ = θj − θi is at least its own standard
 * deviation, δ ≥ √CRB(δ) with CRB(δ) = C_ii + C_jj − 2·C_ij (C the Cramér–Rao bound of crb.ts);
 * the limit is the δ solving δ = √CRB(δ). The criterion comes from the reference list
 * (docs/references.md §8); the check values in the tests were computed from it, not quoted
 * from the paper. Angles as docs/conventions.md §1 (degrees from broadside, u = sin θ).
 */
import { DoaInputError, DoaNumericalError } from '../errors';
import {
  requireElementCount,
  requireSpacing,
  requireFiniteArray,
  requirePositive,
  requirePositiveInteger,
  requireBearing,
} from '../checks';
import { RAD_PER_DEG } from '../angles';
import { crbFromChecked, requireBoundKind, type BoundKind, type Checked } from './crb';

export interface ResolutionLimitInput {
  elements: number;
  spacingWavelengths: number;
  /** Bearing of the midpoint of the pair, degrees; the pair is (centre − δ/2, centre + δ/2). */
  centerDeg: number;
  /** Linear powers of the two sources. */
  sourcePowers: [number, number] | ArrayLike<number>;
  noisePower: number;
  snapshots: number;
  bound?: BoundKind;
}

export interface ResolutionLimit {
  /** δ solving δ = √CRB(δ), degrees; null when no separation inside the visible region satisfies it. */
  deltaDeg: number | null;
  /** The same separation in u: sin(centre + δ/2) − sin(centre − δ/2). */
  deltaU: number | null;
  criterion: 'Smith (2005): δ = √(C11 + C22 − 2·C12)';
}

export const SMITH_CRITERION = 'Smith (2005): δ = √(C11 + C22 − 2·C12)' as const;

export function separationStdRad(c: Checked, kind: BoundKind, i: number, j: number): number {
  const r = crbFromChecked(c, kind);
  const k = r.sources;
  const v = r.covarianceRad2[i * k + i] + r.covarianceRad2[j * k + j] - 2 * r.covarianceRad2[i * k + j];
  return Math.sqrt(Math.max(0, v));
}

/** Smith's statistical resolution limit for two sources centred at `centerDeg`. */
export function statisticalResolutionLimit(input: ResolutionLimitInput): ResolutionLimit {
  if (input === null || typeof input !== 'object')
    throw new DoaInputError('bad-option', 'the resolution limit needs an input object');
  const m = requireElementCount(input.elements);
  const d = requireSpacing(input.spacingWavelengths);
  const center = requireBearing(input.centerDeg, 'centerDeg');
  if (Math.abs(center) >= 90)
    throw new DoaInputError('bad-value', `centerDeg = ${center} must lie strictly inside (−90, 90)`);
  const powers = requireFiniteArray(input.sourcePowers, 'sourcePowers', 2);
  for (let i = 0; i < 2; i++)
    if (!(powers[i] > 0))
      throw new DoaInputError('bad-value', `sourcePowers[${i}] must be greater than 0, got ${powers[i]}`);
  const noise = requirePositive(input.noisePower, 'noisePower');
  const n = requirePositiveInteger(input.snapshots, 'snapshots');
  const kind = requireBoundKind(input.bound ?? 'stochastic');
  if (m < 3) return { deltaDeg: null, deltaU: null, criterion: SMITH_CRITERION };
  const thetaC = center * RAD_PER_DEG;
  const maxDelta = 2 * (Math.PI / 2 - Math.abs(thetaC)) * (1 - 1e-9);
  // g(δ) = δ − √CRB(δ); negative for small δ (the bound grows like δ^−2), positive for large δ.
  const g = (delta: number): number => {
    const c: Checked = { m, d, theta: Float64Array.of(thetaC - delta / 2, thetaC + delta / 2), powers, noise, n };
    try {
      return delta - separationStdRad(c, kind, 0, 1);
    } catch (e) {
      if (e instanceof DoaNumericalError || e instanceof DoaInputError) return -Infinity;
      throw e;
    }
  };
  const toResult = (delta: number): ResolutionLimit => ({
    deltaDeg: delta / RAD_PER_DEG,
    deltaU: Math.sin(thetaC + delta / 2) - Math.sin(thetaC - delta / 2),
    criterion: SMITH_CRITERION,
  });
  // Start near the Rayleigh gap (converted to θ at the centre) and bracket.
  let hi = Math.min(maxDelta, 1 / (m * d * Math.max(Math.cos(thetaC), 1e-6)));
  let lo = hi;
  if (g(hi) > 0) {
    lo = hi / 2;
    while (g(lo) > 0) {
      hi = lo;
      lo /= 2;
      if (lo < 1e-12) return toResult(lo);
    }
  } else {
    for (;;) {
      lo = hi;
      if (hi >= maxDelta) return { deltaDeg: null, deltaU: null, criterion: SMITH_CRITERION };
      hi = Math.min(maxDelta, hi * 2);
      if (g(hi) > 0) break;
    }
  }
  for (let it = 0; it < 200 && hi - lo > 1e-14 * hi; it++) {
    const mid = 0.5 * (lo + hi);
    if (g(mid) > 0) hi = mid;
    else lo = mid;
  }
  return toResult(0.5 * (lo + hi));
}
