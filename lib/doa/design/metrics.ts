/**
 * Accuracy metrics between estimated and true bearings (degrees).
 *
 * matchingDistance: min over one-to-one pairings of the largest absolute error.
 * pairedRmse: the root-mean-square error under the pairing that minimises it.
 * On the real line both optima are reached by pairing the sorted lists in
 * order (for any cost that is a convex function of the difference the sorted
 * pairing is optimal: an exchange argument on crossing pairs), so both cost
 * O(K log K). The tests check this against a brute-force search over all
 * permutations. Both lists must have the same length.
 */
import { requireFiniteEntries } from '../checks';
import { DoaInputError } from '../errors';

function sortedPair(estimated: ArrayLike<number>, truth: ArrayLike<number>): [number[], number[]] {
  if (estimated.length !== truth.length) {
    throw new DoaInputError(
      'bad-size',
      `${estimated.length} estimated bearing(s) against ${truth.length} true one(s): the metrics need equal counts`,
    );
  }
  requireFiniteEntries(estimated, 'estimated bearings');
  requireFiniteEntries(truth, 'true bearings');
  return [Array.from(estimated).sort((a, b) => a - b), Array.from(truth).sort((a, b) => a - b)];
}

export function matchingDistance(estimated: ArrayLike<number>, truth: ArrayLike<number>): number {
  const [a, b] = sortedPair(estimated, truth);
  let worst = 0;
  for (let i = 0; i < a.length; i++) worst = Math.max(worst, Math.abs(a[i] - b[i]));
  return worst;
}

export function pairedRmse(estimated: ArrayLike<number>, truth: ArrayLike<number>): number {
  const [a, b] = sortedPair(estimated, truth);
  if (a.length === 0) return 0;
  let s = 0;
  for (let i = 0; i < a.length; i++) s += (a[i] - b[i]) ** 2;
  return Math.sqrt(s / a.length);
}
