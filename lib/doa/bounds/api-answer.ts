/**
 * Request shaping for POST /api/v1/bounds (docs/conventions.md §7): the engine's stochastic CRB
 * (crb.ts) and the gap test of every pair, in the v1 field names. No numerics of its own.
 */
import { DoaInputError } from '../errors';
import { checkBoundsInput, crbFromChecked, type BoundsInput } from './crb';

export interface BoundsRequest {
  array: { elements: number; spacingWavelengths: number };
  bearingsDeg: ArrayLike<number>;
  sourcePowers: ArrayLike<number>;
  noisePower: number;
  snapshots: number;
}

export interface BoundsAnswer {
  crbStdDeg: number[];
  rayleighGapU: number;
  pairs: Array<{ i: number; j: number; separationU: number; belowResolvableGap: boolean }>;
}

/**
 * The answer of POST /api/v1/bounds (docs/conventions.md §7): the stochastic CRB std per
 * source in degrees, the Rayleigh gap 1/(M·d) and, for each pair i < j (0-based),
 * |sin θi − sin θj| and the docs/conventions.md §5 gap test.
 */
export function bounds(request: BoundsRequest): BoundsAnswer {
  if (request === null || typeof request !== 'object')
    throw new DoaInputError('bad-option', 'the request must be an object');
  if (request.array === null || typeof request.array !== 'object')
    throw new DoaInputError('bad-option', 'array must be an object with elements and spacingWavelengths');
  const input: BoundsInput = {
    elements: request.array.elements,
    spacingWavelengths: request.array.spacingWavelengths,
    bearingsDeg: request.bearingsDeg,
    sourcePowers: request.sourcePowers,
    noisePower: request.noisePower,
    snapshots: request.snapshots,
  };
  const c = checkBoundsInput(input);
  const crb = crbFromChecked(c, 'stochastic');
  const gapU = 1 / (c.m * c.d);
  const pairs: BoundsAnswer['pairs'] = [];
  for (let i = 0; i < c.theta.length; i++) {
    for (let j = i + 1; j < c.theta.length; j++) {
      const sepU = Math.abs(Math.sin(c.theta[i]) - Math.sin(c.theta[j]));
      pairs.push({ i, j, separationU: sepU, belowResolvableGap: sepU < gapU });
    }
  }
  return { crbStdDeg: Array.from(crb.stdDeg), rayleighGapU: gapU, pairs };
}
