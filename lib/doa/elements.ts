/**
 * Element selection on a line with disabled (failed) elements (docs/conventions.md §9).
 *
 * Indices are 0-based positions on the full line: element m sits at m·d (d in wavelengths),
 * whether or not its neighbours are enabled. A selection never renumbers elements.
 *
 * Which elements a method uses (the rule, also in docs/imperfect-arrays.md):
 *  - MUSIC, Bartlett and MVDR evaluate a(θ) at any positions, so they use every enabled element
 *    at its true position ('enabled-true-positions'), as long as no step needs a uniform line.
 *  - ESPRIT (all three variants) needs two identical subarrays displaced by d, and root-MUSIC needs
 *    a(θ) to be powers of one z; both need a uniform line. They use the longest contiguous run of
 *    enabled elements ('longest-contiguous-run'; on a tie, the run nearest element 0).
 *  - Spatial smoothing, the single-snapshot arrangement and forward–backward averaging need a
 *    uniform line too, so with any of them every method uses the longest run.
 * With no element disabled the selection is the whole line ('all').
 */
import { DoaInputError } from './errors';
import { SPECTRAL_METHODS, type DoaMethod } from './methods/registry';
import { stochasticCrb } from './bounds/crb';

export type ElementSelectionKind = 'all' | 'enabled-true-positions' | 'longest-contiguous-run';

export interface ElementSelection {
  kind: ElementSelectionKind;
  /** The elements used, 0-based indices on the full line, ascending. */
  indices: number[];
  /** Elements of the full line. */
  lineElements: number;
  /** Enabled elements, 0-based, ascending. */
  enabled: number[];
}

/** Checks a list of enabled elements: integers, strictly ascending, inside [0, M), at least 2. */
export function checkEnabledIndices(
  enabled: readonly number[],
  lineElements: number,
  name = 'elementIndices',
): number[] {
  if (!Array.isArray(enabled)) throw new DoaInputError('bad-option', `${name} must be a list of element indices`);
  for (let i = 0; i < enabled.length; i++) {
    const v = enabled[i];
    if (!Number.isInteger(v) || v < 0 || v >= lineElements)
      throw new DoaInputError(
        'bad-option',
        `${name}[${i}] = ${String(v)} is not an element index from 0 to ${lineElements - 1}`,
      );
    if (i > 0 && v <= enabled[i - 1])
      throw new DoaInputError(
        'bad-option',
        `${name} must be strictly ascending; ${name}[${i}] = ${v} follows ${enabled[i - 1]}`,
      );
  }
  if (enabled.length < 2)
    throw new DoaInputError(
      'too-few-elements',
      `${name} keeps ${enabled.length} element(s); an estimate needs at least 2`,
    );
  return enabled.slice();
}

/** The longest run of consecutive indices in an ascending list (the first one on a tie). */
export function longestContiguousRun(enabled: readonly number[]): number[] {
  let bestStart = 0;
  let bestLength = 0;
  let start = 0;
  for (let i = 0; i <= enabled.length; i++) {
    if (i === enabled.length || (i > start && enabled[i] !== enabled[i - 1] + 1)) {
      if (i - start > bestLength) {
        bestLength = i - start;
        bestStart = start;
      }
      start = i;
    }
  }
  return enabled.slice(bestStart, bestStart + bestLength);
}

/** Enabled element indices (0-based) from per-element states; missing `enabled` counts as enabled. */
export function enabledIndicesOf(states: readonly { enabled?: boolean }[]): number[] {
  const out: number[] = [];
  states.forEach((s, i) => {
    if (!s || s.enabled !== false) out.push(i);
  });
  return out;
}

/** True when a step of the options needs a uniform line (smoothing, single-snapshot, forward–backward). */
export function needsUniformLine(options: {
  forwardBackward?: boolean;
  smoothingSubarray?: number;
  singleSnapshot?: boolean;
}): boolean {
  return Boolean(options.forwardBackward) || options.smoothingSubarray !== undefined || Boolean(options.singleSnapshot);
}

/** The elements `method` uses on a line of `lineElements` with `enabled` elements (see the header). */
export function selectElements(
  method: DoaMethod,
  enabled: readonly number[],
  lineElements: number,
  options: { forwardBackward?: boolean; smoothingSubarray?: number; singleSnapshot?: boolean } = {},
): ElementSelection {
  const list = checkEnabledIndices(enabled, lineElements);
  if (list.length === lineElements) return { kind: 'all', indices: list, lineElements, enabled: list };
  if (SPECTRAL_METHODS.has(method) && !needsUniformLine(options))
    return { kind: 'enabled-true-positions', indices: list, lineElements, enabled: list };
  const run = longestContiguousRun(list);
  if (run.length < 2)
    throw new DoaInputError(
      'too-few-elements',
      `${method} needs a run of at least 2 adjacent enabled elements; no two enabled elements are adjacent`,
    );
  return { kind: 'longest-contiguous-run', indices: run, lineElements, enabled: list };
}

/** 1-based element list for people: "1–9", "3, 5, 7–12". */
export function describeElements(indices: readonly number[]): string {
  const parts: string[] = [];
  let i = 0;
  while (i < indices.length) {
    let j = i;
    while (j + 1 < indices.length && indices[j + 1] === indices[j] + 1) j++;
    parts.push(
      j === i
        ? `${indices[i] + 1}`
        : j === i + 1
          ? `${indices[i] + 1}, ${indices[j] + 1}`
          : `${indices[i] + 1}–${indices[j] + 1}`,
    );
    i = j + 1;
  }
  return parts.join(', ');
}

/** One sentence saying which elements a selection used (no bound figures; the run layer adds those). */
export function describeSelection(method: DoaMethod, s: ElementSelection): string {
  const disabled: number[] = [];
  for (let m = 0, j = 0; m < s.lineElements; m++) {
    if (s.enabled[j] === m) j++;
    else disabled.push(m);
  }
  const off = `element${disabled.length === 1 ? '' : 's'} ${describeElements(disabled)} disabled`;
  if (s.kind === 'enabled-true-positions')
    return `${method} used the ${s.indices.length} enabled elements at their true positions (${off} on the ${s.lineElements}-element line)`;
  if (s.kind === 'longest-contiguous-run')
    return `${method} used the longest contiguous run of enabled elements, ${describeElements(s.indices)} (${s.indices.length} of ${s.lineElements}; ${off}), because it needs a uniform line`;
  return `${method} used all ${s.lineElements} elements`;
}

export interface SubsetCost {
  /** Largest ratio over the sources of the CRB std on the enabled elements to that on the full line. */
  enabledVsFullLine: number;
  /** The same for the elements the method used against the enabled elements (1 when it used them all). */
  usedVsEnabled: number;
}

/**
 * What a selection costs in the stochastic CRB (Stoica & Nehorai 1990, uncorrelated sources) at
 * the given bearings, powers and noise: ratios of √CRB, the largest over the sources.
 */
export function subsetCrbCost(input: {
  spacingWavelengths: number;
  bearingsDeg: readonly number[];
  sourcePowers: readonly number[];
  noisePower: number;
  snapshots: number;
  selection: ElementSelection;
}): SubsetCost {
  const { selection: s, ...rest } = input;
  const bound = (indices?: readonly number[]) =>
    stochasticCrb({ ...rest, elements: s.lineElements, ...(indices ? { elementIndices: indices } : {}) }).stdDeg;
  const worst = (a: Float64Array, b: Float64Array) => a.reduce((w, v, i) => Math.max(w, v / b[i]), 0);
  const full = bound();
  const enabled = s.enabled.length === s.lineElements ? full : bound(s.enabled);
  const used = s.indices.length === s.enabled.length ? enabled : bound(s.indices);
  return { enabledVsFullLine: worst(enabled, full), usedVsEnabled: worst(used, enabled) };
}

/** The cost as a sentence for the 'element-subset' warning. */
export function describeSubsetCost(s: ElementSelection, cost: SubsetCost): string {
  const e = `At the estimated bearings and powers the CRB on the ${s.enabled.length} enabled elements is ${cost.enabledVsFullLine.toFixed(2)}× that of the full ${s.lineElements}-element line`;
  if (s.kind !== 'longest-contiguous-run') return `${e}.`;
  return `${e}, and on the ${s.indices.length}-element run ${cost.usedVsEnabled.toFixed(2)}× that of the enabled elements (standard deviations, worst source).`;
}
