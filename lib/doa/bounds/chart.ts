/**
 * Chart data (not numerics of its own): the designer's separation-versus-aperture curves,
 * the Rayleigh gap and Smith's statistical limit (resolution.ts) against element count.
 */
import { DoaInputError } from '../errors';
import {
  requireElementCount,
  requireSpacing,
  requireFiniteArray,
  requirePositiveInteger,
  requireBearing,
  requireFinite,
} from '../checks';
import { RAD_PER_DEG } from '../angles';
import { rayleighGap } from '../design/array-figures';
import type { BoundKind } from './crb';
import { SMITH_CRITERION, statisticalResolutionLimit } from './resolution';

export interface SeparationChartInput {
  /** Element counts to evaluate (each ≥ 2). Default 2…64. */
  elementCounts?: ArrayLike<number>;
  spacingWavelengths: number;
  /** Look direction (centre of the pair), degrees, strictly inside (−90, 90). Default 0. */
  lookDeg?: number;
  /** Per-element SNR of each of the two equal sources, dB. */
  snrDb: number;
  snapshots: number;
  bound?: BoundKind;
}

export interface SeparationChart {
  elements: Float64Array;
  apertureWavelengths: Float64Array;
  /** 1/(M·d). */
  rayleighGapU: Float64Array;
  /** The Rayleigh gap as a bearing separation centred on the look direction: 2·asin(Δu/(2·cos θ0)); NaN when it does not fit in view. */
  rayleighGapDeg: Float64Array;
  /** Smith (2005) limit, degrees, centred on the look direction; NaN when none fits in view (or M = 2). */
  statisticalLimitDeg: Float64Array;
  statisticalLimitU: Float64Array;
  criterion: 'Smith (2005): δ = √(C11 + C22 − 2·C12)';
}

/**
 * Curves for the designer's separation-versus-aperture chart: the Rayleigh gap and
 * Smith's statistical resolution limit against element count, for two equal
 * uncorrelated sources centred on the look direction.
 * Note: `arrayMetrics().rayleighGapDeg` is the one-sided broadside value
 * asin(1/(M·d)) of docs/conventions.md §5; the chart centres the pair on the look
 * direction so both curves and planned pairs share one definition of separation.
 */
export function separationVersusAperture(input: SeparationChartInput): SeparationChart {
  if (input === null || typeof input !== 'object')
    throw new DoaInputError('bad-option', 'the chart needs an input object');
  const d = requireSpacing(input.spacingWavelengths);
  const look = requireBearing(input.lookDeg ?? 0, 'lookDeg');
  if (Math.abs(look) >= 90)
    throw new DoaInputError('bad-value', `lookDeg = ${look} must lie strictly inside (−90, 90)`);
  const snrDb = requireFinite(input.snrDb, 'snrDb');
  const n = requirePositiveInteger(input.snapshots, 'snapshots');
  let counts: Float64Array;
  if (input.elementCounts === undefined) {
    counts = new Float64Array(63);
    for (let i = 0; i < 63; i++) counts[i] = i + 2;
  } else {
    counts = requireFiniteArray(input.elementCounts, 'elementCounts');
    if (counts.length === 0) throw new DoaInputError('bad-size', 'elementCounts must not be empty');
    if (counts.length > 1024)
      throw new DoaInputError('bad-size', `elementCounts has ${counts.length} entries; at most 1024 are allowed`);
    for (let i = 0; i < counts.length; i++) requireElementCount(counts[i], `elementCounts[${i}]`);
  }
  const snr = Math.pow(10, snrDb / 10);
  const cos0 = Math.cos(look * RAD_PER_DEG);
  const len = counts.length;
  const out: SeparationChart = {
    elements: counts,
    apertureWavelengths: new Float64Array(len),
    rayleighGapU: new Float64Array(len),
    rayleighGapDeg: new Float64Array(len),
    statisticalLimitDeg: new Float64Array(len),
    statisticalLimitU: new Float64Array(len),
    criterion: SMITH_CRITERION,
  };
  for (let idx = 0; idx < len; idx++) {
    const m = counts[idx];
    out.apertureWavelengths[idx] = (m - 1) * d;
    const gapU = rayleighGap(m, d).u;
    out.rayleighGapU[idx] = gapU;
    const arg = gapU / (2 * cos0);
    const delta = arg <= 1 ? 2 * Math.asin(arg) : NaN;
    out.rayleighGapDeg[idx] =
      Number.isFinite(delta) && Math.abs(look * RAD_PER_DEG) + delta / 2 < Math.PI / 2 ? delta / RAD_PER_DEG : NaN;
    const lim = statisticalResolutionLimit({
      elements: m,
      spacingWavelengths: d,
      centerDeg: look,
      sourcePowers: [snr, snr],
      noisePower: 1,
      snapshots: n,
      bound: input.bound,
    });
    out.statisticalLimitDeg[idx] = lim.deltaDeg ?? NaN;
    out.statisticalLimitU[idx] = lim.deltaU ?? NaN;
  }
  return out;
}
