/**
 * The one comparison of an estimate run with a repetition of it: the same
 * method's bearings (degrees from broadside, ascending, docs/conventions.md §1)
 * compared element by element. A repetition "reproduces" a run when every
 * method gives as many bearings as before, each within
 * REPRODUCE_TOLERANCE_DEG of the stored one. Used by the re-run of a stored
 * run (lib/data/estimates.ts) and by the re-execution of the runs in an
 * imported bundle (lib/handoff/runs.ts). Pure: no React, Next or database.
 */
import type { DoaMethod } from '@/lib/doa/methods/registry';

/**
 * Largest bearing difference (degrees) still called "reproduced". The engine
 * is deterministic, so on the same build a repetition gives the same bits;
 * the tolerance leaves room only for floating-point differences between
 * machines and builds (a bearing near 1e2° carries about 1e-14° of rounding).
 */
export const REPRODUCE_TOLERANCE_DEG = 1e-9;

export interface MethodComparison {
  method: DoaMethod;
  storedDeg: number[];
  recomputedDeg: number[];
  /** recomputed − stored, element by element; null when the counts differ. */
  differencesDeg: number[] | null;
  maxAbsDifferenceDeg: number | null;
  reproduced: boolean;
  message: string;
}

const fmtDeg = (v: number) => (Math.abs(v) < 1e-3 && v !== 0 ? v.toExponential(3) : v.toFixed(6));

/** Compares one method's stored and recomputed bearings. */
export function compareBearings(
  method: DoaMethod,
  stored: number[],
  recomputed: number[],
  tolerance = REPRODUCE_TOLERANCE_DEG,
): MethodComparison {
  if (stored.length !== recomputed.length) {
    return {
      method,
      storedDeg: stored,
      recomputedDeg: recomputed,
      differencesDeg: null,
      maxAbsDifferenceDeg: null,
      reproduced: false,
      message: `${method}: the bundle stores ${stored.length} bearing(s), re-running gives ${recomputed.length} (${recomputed.map(fmtDeg).join(', ') || 'none'})`,
    };
  }
  const diffs = recomputed.map((v, k) => v - stored[k]);
  const max = diffs.reduce((a, d) => Math.max(a, Math.abs(d)), 0);
  const reproduced = max <= tolerance;
  return {
    method,
    storedDeg: stored,
    recomputedDeg: recomputed,
    differencesDeg: diffs,
    maxAbsDifferenceDeg: max,
    reproduced,
    message: reproduced
      ? `${method}: reproduced (largest difference ${max.toExponential(2)}°, tolerance ${tolerance}°)`
      : `${method}: differs by up to ${max.toExponential(3)}°: ${diffs.map((d, k) => `bearing ${k + 1} stored ${fmtDeg(stored[k])}°, now ${fmtDeg(recomputed[k])}° (Δ ${d.toExponential(3)}°)`).join('; ')}`,
  };
}

/** One method of POST /api/v1/estimates/{id}/rerun's `comparison`. */
export interface RerunComparison {
  method: DoaMethod;
  storedBearingsDeg: number[];
  newBearingsDeg: number[];
  maxAbsDifferenceDeg: number | null;
  /** The same bearings within REPRODUCE_TOLERANCE_DEG (see compareBearings). */
  reproduced: boolean;
  /** Kept for API clients: equals `reproduced`. */
  identical: boolean;
}

/** Compares a re-run with the run it repeats, method by method (a method the old run lacks compares with no bearings). */
export function compareRuns(
  before: { method: DoaMethod; bearingsDeg: number[] }[],
  after: { method: DoaMethod; bearingsDeg: number[] }[],
): RerunComparison[] {
  return after.map((r) => {
    const stored = before.find((b) => b.method === r.method)?.bearingsDeg ?? [];
    const c = compareBearings(r.method, stored, r.bearingsDeg);
    return {
      method: r.method,
      storedBearingsDeg: stored,
      newBearingsDeg: r.bearingsDeg,
      maxAbsDifferenceDeg: c.maxAbsDifferenceDeg,
      reproduced: c.reproduced,
      identical: c.reproduced,
    };
  });
}
