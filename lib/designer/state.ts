/**
 * Pure state of the array designer: a complete array input plus a reducer.
 *
 * The array stays uniform: every geometry action changes the element count or
 * the one spacing d. Element m sits at x_m = m·d (docs/conventions.md §1); element 0 is
 * the fixed reference at x = 0, so dragging element m to x sets d = x / m.
 * Per-element state (enabled, gain, phase) travels with its element when one is
 * inserted or removed before it.
 *
 * No React here: the designer component calls `designerReducer` through
 * useReducer, and the tests call it directly.
 */
import {
  MAX_ELEMENTS,
  MIN_ELEMENTS,
  resolveArrayGeometry,
  spacingInUnit,
  toEngineMedium,
  type ArrayInput,
  type ElementState,
  type MediumInput,
  type PlannedSource,
  type SpacingUnit,
  type TaperInput,
} from '@/lib/validations/array';
import { propagationSpeed } from '@/lib/doa/design/medium';

/** An array input with every designer field present. */
export type DesignerDraft = ArrayInput & {
  medium: MediumInput;
  steerDeg: number;
  scanSectorDeg: number;
  taper: TaperInput;
  elementStates: ElementState[];
  plannedSources: PlannedSource[];
  snapshots: number;
  snrDb: number;
};

/** Spacing limits for dragging and keyboard steps, in wavelengths. */
export const MIN_DRAG_SPACING_WAVELENGTHS = 0.05;
export const MAX_DRAG_SPACING_WAVELENGTHS = 20;
/** Planned sources the designer keeps at most (the schema allows 32). */
export const MAX_PLANNED_SOURCES = 32;

export const defaultElementState = (): ElementState => ({ enabled: true, gainDb: 0, phaseDeg: 0 });

/** The medium's speed, or undefined when the medium cannot be evaluated. */
function mediumSpeed(medium: MediumInput): number | undefined {
  try {
    return propagationSpeed(toEngineMedium(medium)).speedMps;
  } catch {
    return undefined;
  }
}

/**
 * Fills the designer defaults, resizes elementStates to `elements` (new ones
 * enabled, 0 dB, 0°) and takes propagationSpeedMps from the medium when a
 * medium is given (the medium is the source of the speed in the designer).
 */
export function normalizeDraft(input: ArrayInput): DesignerDraft {
  const medium: MediumInput =
    input.medium ??
    (input.propagationSpeedMps !== undefined
      ? { kind: 'custom', speedMps: input.propagationSpeedMps }
      : { kind: 'radio' });
  const states = (input.elementStates ?? []).slice(0, input.elements).map((s) => ({ ...s }));
  while (states.length < input.elements) states.push(defaultElementState());
  const speed = mediumSpeed(medium);
  return {
    ...input,
    propagationSpeedMps: speed ?? input.propagationSpeedMps,
    medium,
    steerDeg: input.steerDeg ?? 0,
    scanSectorDeg: input.scanSectorDeg ?? 0,
    taper: input.taper ?? { kind: 'uniform' },
    elementStates: states,
    plannedSources: (input.plannedSources ?? []).map((s) => ({ ...s })),
    snapshots: input.snapshots ?? 100,
    snrDb: input.snrDb ?? 10,
  };
}

/** Spacing in wavelengths of a draft (via resolveArrayGeometry). */
export function draftSpacingWavelengths(draft: DesignerDraft): number {
  return resolveArrayGeometry(draft).spacingWavelengths;
}

export type DesignerAction =
  | { type: 'replace'; input: ArrayInput }
  | { type: 'setName'; name: string }
  | { type: 'addElement'; at?: number }
  | { type: 'removeElement'; index: number }
  | { type: 'setElementCount'; elements: number }
  | { type: 'setSpacingWavelengths'; spacingWavelengths: number }
  | { type: 'setSpacing'; value: number; unit: SpacingUnit }
  | { type: 'dragElement'; index: number; positionWavelengths: number }
  | { type: 'toggleElement'; index: number }
  | { type: 'setElementGain'; index: number; gainDb: number }
  | { type: 'setElementPhase'; index: number; phaseDeg: number }
  | { type: 'addSource'; bearingDeg: number; snrDb?: number }
  | { type: 'moveSource'; index: number; bearingDeg: number }
  | { type: 'removeSource'; index: number }
  | { type: 'setTaper'; taper: TaperInput }
  | { type: 'setSteer'; steerDeg: number }
  | { type: 'setScanSector'; scanSectorDeg: number }
  | { type: 'setMedium'; medium: MediumInput }
  | { type: 'setFrequency'; frequencyHz: number }
  | { type: 'setSnapshots'; snapshots: number }
  | { type: 'setSnr'; snrDb: number };

const clamp = (v: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, v));
const okIndex = (i: number, n: number) => Number.isInteger(i) && i >= 0 && i < n;
const finite = (v: number) => typeof v === 'number' && Number.isFinite(v);

/** Keeps the spacing unit: converts a spacing in wavelengths to the draft's unit. */
function withSpacingWavelengths(state: DesignerDraft, d: number): DesignerDraft {
  const geometry = resolveArrayGeometry(state);
  const exact = spacingInUnit(d, state.spacing.unit, geometry.wavelengthM);
  // Physical units keep 6 significant digits (µm-level at metre spacings), so the form shows a readable number.
  const value = state.spacing.unit === 'wavelength' ? exact : Number(exact.toPrecision(6));
  if (value === state.spacing.value) return state;
  return { ...state, spacing: { value, unit: state.spacing.unit } };
}

/**
 * The designer reducer. Invalid actions (bad index, non-finite number, an
 * element count leaving 2…512, disabling the last enabled element) return the
 * state unchanged, so a stray event can never produce an invalid array.
 */
export function designerReducer(state: DesignerDraft, action: DesignerAction): DesignerDraft {
  switch (action.type) {
    case 'replace':
      return normalizeDraft(action.input);
    case 'setName':
      return action.name === state.name ? state : { ...state, name: action.name };
    case 'addElement': {
      if (state.elements >= MAX_ELEMENTS) return state;
      const at = action.at === undefined ? state.elements : action.at;
      if (!Number.isInteger(at) || at < 0 || at > state.elements) return state;
      const elementStates = [
        ...state.elementStates.slice(0, at),
        defaultElementState(),
        ...state.elementStates.slice(at),
      ];
      return { ...state, elements: state.elements + 1, elementStates };
    }
    case 'removeElement': {
      if (state.elements <= MIN_ELEMENTS || !okIndex(action.index, state.elements)) return state;
      const elementStates = state.elementStates.filter((_, i) => i !== action.index);
      if (!elementStates.some((e) => e.enabled)) elementStates[0] = { ...elementStates[0], enabled: true };
      return { ...state, elements: state.elements - 1, elementStates };
    }
    case 'setElementCount': {
      const n = action.elements;
      if (!Number.isInteger(n) || n < MIN_ELEMENTS || n > MAX_ELEMENTS || n === state.elements) return state;
      return normalizeDraft({ ...state, elements: n });
    }
    case 'setSpacingWavelengths': {
      if (!finite(action.spacingWavelengths) || action.spacingWavelengths <= 0) return state;
      return withSpacingWavelengths(state, action.spacingWavelengths);
    }
    case 'setSpacing': {
      if (!finite(action.value) || action.value <= 0) return state;
      if (action.unit !== 'wavelength' && (state.frequencyHz === undefined || state.propagationSpeedMps === undefined))
        return state;
      return { ...state, spacing: { value: action.value, unit: action.unit } };
    }
    case 'dragElement': {
      // Element 0 is the reference at x = 0; it cannot set the spacing.
      if (!okIndex(action.index, state.elements) || action.index === 0 || !finite(action.positionWavelengths))
        return state;
      const raw = action.positionWavelengths / action.index;
      const d = clamp(Math.round(raw * 1e4) / 1e4, MIN_DRAG_SPACING_WAVELENGTHS, MAX_DRAG_SPACING_WAVELENGTHS);
      return withSpacingWavelengths(state, d);
    }
    case 'toggleElement': {
      if (!okIndex(action.index, state.elements)) return state;
      const current = state.elementStates[action.index];
      if (current.enabled && state.elementStates.filter((e) => e.enabled).length === 1) return state;
      const elementStates = state.elementStates.map((e, i) => (i === action.index ? { ...e, enabled: !e.enabled } : e));
      return { ...state, elementStates };
    }
    case 'setElementGain': {
      if (!okIndex(action.index, state.elements) || !finite(action.gainDb)) return state;
      const gainDb = clamp(action.gainDb, -60, 60);
      return {
        ...state,
        elementStates: state.elementStates.map((e, i) => (i === action.index ? { ...e, gainDb } : e)),
      };
    }
    case 'setElementPhase': {
      if (!okIndex(action.index, state.elements) || !finite(action.phaseDeg)) return state;
      const phaseDeg = clamp(action.phaseDeg, -360, 360);
      return {
        ...state,
        elementStates: state.elementStates.map((e, i) => (i === action.index ? { ...e, phaseDeg } : e)),
      };
    }
    case 'addSource': {
      if (state.plannedSources.length >= MAX_PLANNED_SOURCES || !finite(action.bearingDeg)) return state;
      const source: PlannedSource = { bearingDeg: clamp(action.bearingDeg, -90, 90) };
      if (action.snrDb !== undefined && finite(action.snrDb)) source.snrDb = action.snrDb;
      return { ...state, plannedSources: [...state.plannedSources, source] };
    }
    case 'moveSource': {
      if (!okIndex(action.index, state.plannedSources.length) || !finite(action.bearingDeg)) return state;
      const bearingDeg = clamp(action.bearingDeg, -90, 90);
      if (state.plannedSources[action.index].bearingDeg === bearingDeg) return state;
      return {
        ...state,
        plannedSources: state.plannedSources.map((s, i) => (i === action.index ? { ...s, bearingDeg } : s)),
      };
    }
    case 'removeSource': {
      if (!okIndex(action.index, state.plannedSources.length)) return state;
      return { ...state, plannedSources: state.plannedSources.filter((_, i) => i !== action.index) };
    }
    case 'setTaper':
      return { ...state, taper: { ...action.taper } };
    case 'setSteer':
      return finite(action.steerDeg) ? { ...state, steerDeg: clamp(action.steerDeg, -90, 90) } : state;
    case 'setScanSector':
      return finite(action.scanSectorDeg) ? { ...state, scanSectorDeg: clamp(action.scanSectorDeg, 0, 90) } : state;
    case 'setMedium': {
      const speed = mediumSpeed(action.medium);
      if (speed === undefined) return state;
      return { ...state, medium: { ...action.medium }, propagationSpeedMps: speed };
    }
    case 'setFrequency':
      return finite(action.frequencyHz) && action.frequencyHz > 0
        ? { ...state, frequencyHz: action.frequencyHz }
        : state;
    case 'setSnapshots':
      return Number.isInteger(action.snapshots) && action.snapshots >= 1 && action.snapshots <= 1e7
        ? { ...state, snapshots: action.snapshots }
        : state;
    case 'setSnr':
      return finite(action.snrDb) ? { ...state, snrDb: clamp(action.snrDb, -60, 100) } : state;
    default:
      return state;
  }
}

/** The indices of enabled elements, and the longest run of consecutive enabled elements. */
export function enabledSummary(states: readonly ElementState[]): {
  enabledCount: number;
  disabled: number[];
  longestRun: { start: number; length: number };
} {
  const disabled: number[] = [];
  let best = { start: 0, length: 0 };
  let runStart = -1;
  states.forEach((s, i) => {
    if (!s.enabled) {
      disabled.push(i);
      runStart = -1;
      return;
    }
    if (runStart < 0) runStart = i;
    const length = i - runStart + 1;
    if (length > best.length) best = { start: runStart, length };
  });
  return { enabledCount: states.length - disabled.length, disabled, longestRun: best };
}
