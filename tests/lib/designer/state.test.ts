import { describe, expect, it } from 'vitest';
import {
  designerReducer,
  enabledSummary,
  normalizeDraft,
  draftSpacingWavelengths,
  type DesignerAction,
  type DesignerDraft,
} from '@/lib/designer/state';
import { arrayInputSchema } from '@/lib/validations/array';

const base = (): DesignerDraft =>
  normalizeDraft({ name: 'Test line', elements: 4, spacing: { value: 0.5, unit: 'wavelength' } });

function run(state: DesignerDraft, ...actions: DesignerAction[]): DesignerDraft {
  return actions.reduce(designerReducer, state);
}

describe('normalizeDraft', () => {
  it('fills defaults and one enabled, ideal state per element', () => {
    const s = base();
    expect(s.elementStates).toHaveLength(4);
    expect(s.elementStates.every((e) => e.enabled && e.gainDb === 0 && e.phaseDeg === 0)).toBe(true);
    expect(s.medium).toEqual({ kind: 'radio' });
    expect(s.propagationSpeedMps).toBe(299_792_458); // SI speed of light, docs/references.md §1
    expect(s.taper).toEqual({ kind: 'uniform' });
    expect(arrayInputSchema.safeParse(s).success).toBe(true);
  });
});

describe('designerReducer: elements', () => {
  it('adds at the end and at a position; per-element state moves with its element', () => {
    let s = run(base(), { type: 'setElementGain', index: 2, gainDb: -3 });
    s = designerReducer(s, { type: 'addElement' });
    expect(s.elements).toBe(5);
    expect(s.elementStates[4]).toEqual({ enabled: true, gainDb: 0, phaseDeg: 0 });
    s = designerReducer(s, { type: 'addElement', at: 1 });
    expect(s.elements).toBe(6);
    // The element that had −3 dB was index 2; one was inserted before it.
    expect(s.elementStates.map((e) => e.gainDb)).toEqual([0, 0, 0, -3, 0, 0]);
    expect(s.spacing).toEqual({ value: 0.5, unit: 'wavelength' });
  });

  it('removes an element and keeps the others in order; never goes below 2', () => {
    let s = run(base(), { type: 'setElementPhase', index: 3, phaseDeg: 12 }, { type: 'removeElement', index: 1 });
    expect(s.elements).toBe(3);
    expect(s.elementStates.map((e) => e.phaseDeg)).toEqual([0, 0, 12]);
    s = designerReducer(s, { type: 'removeElement', index: 0 });
    expect(s.elements).toBe(2);
    expect(designerReducer(s, { type: 'removeElement', index: 0 })).toBe(s);
  });

  it('refuses to grow past 512 elements, and bad indices', () => {
    const big = normalizeDraft({ name: 'x', elements: 512, spacing: { value: 0.5, unit: 'wavelength' } });
    expect(designerReducer(big, { type: 'addElement' })).toBe(big);
    const s = base();
    expect(designerReducer(s, { type: 'addElement', at: 9 })).toBe(s);
    expect(designerReducer(s, { type: 'removeElement', index: 4 })).toBe(s);
    expect(designerReducer(s, { type: 'toggleElement', index: -1 })).toBe(s);
  });

  it('toggles enabled but never disables the last enabled element', () => {
    let s = run(
      base(),
      { type: 'toggleElement', index: 0 },
      { type: 'toggleElement', index: 1 },
      { type: 'toggleElement', index: 2 },
    );
    expect(s.elementStates.map((e) => e.enabled)).toEqual([false, false, false, true]);
    expect(designerReducer(s, { type: 'toggleElement', index: 3 })).toBe(s);
    s = designerReducer(s, { type: 'toggleElement', index: 1 });
    expect(s.elementStates[1].enabled).toBe(true);
  });

  it('setElementCount resizes elementStates', () => {
    const s = run(base(), { type: 'toggleElement', index: 3 }, { type: 'setElementCount', elements: 6 });
    expect(s.elementStates.map((e) => e.enabled)).toEqual([true, true, true, false, true, true]);
    expect(run(s, { type: 'setElementCount', elements: 2 }).elementStates).toHaveLength(2);
    expect(designerReducer(s, { type: 'setElementCount', elements: 513 })).toBe(s);
  });
});

describe('designerReducer: spacing by dragging (the array stays uniform)', () => {
  it('dragging element m to x sets d = x/m', () => {
    const s = designerReducer(base(), { type: 'dragElement', index: 3, positionWavelengths: 2.1 });
    expect(s.spacing).toEqual({ value: 0.7, unit: 'wavelength' });
  });

  it('keeps the spacing unit: metres stay metres (λ = 1500/1000 = 1.5 m)', () => {
    const s0 = normalizeDraft({
      name: 'x',
      elements: 4,
      spacing: { value: 0.75, unit: 'm' },
      frequencyHz: 1000,
      medium: { kind: 'custom', speedMps: 1500 },
    });
    expect(draftSpacingWavelengths(s0)).toBeCloseTo(0.5, 12);
    const s = designerReducer(s0, { type: 'dragElement', index: 2, positionWavelengths: 1.2 });
    expect(s.spacing.unit).toBe('m');
    expect(s.spacing.value).toBeCloseTo(0.6 * 1.5, 12);
  });

  it('clamps to 0.05…20 λ and ignores element 0 and non-finite positions', () => {
    const s = base();
    expect(designerReducer(s, { type: 'dragElement', index: 1, positionWavelengths: -3 }).spacing.value).toBe(0.05);
    expect(designerReducer(s, { type: 'dragElement', index: 1, positionWavelengths: 400 }).spacing.value).toBe(20);
    expect(designerReducer(s, { type: 'dragElement', index: 0, positionWavelengths: 1 })).toBe(s);
    expect(designerReducer(s, { type: 'dragElement', index: 2, positionWavelengths: NaN })).toBe(s);
  });
});

describe('designerReducer: sources, taper, steering, medium', () => {
  it('adds, moves (clamped to ±90°) and removes planned sources', () => {
    let s = run(base(), { type: 'addSource', bearingDeg: 10 }, { type: 'addSource', bearingDeg: -20, snrDb: 5 });
    expect(s.plannedSources).toEqual([{ bearingDeg: 10 }, { bearingDeg: -20, snrDb: 5 }]);
    s = designerReducer(s, { type: 'moveSource', index: 0, bearingDeg: 120 });
    expect(s.plannedSources[0].bearingDeg).toBe(90);
    s = designerReducer(s, { type: 'removeSource', index: 0 });
    expect(s.plannedSources).toEqual([{ bearingDeg: -20, snrDb: 5 }]);
  });

  it('sets taper and steering; steering is clamped to ±90°', () => {
    const s = run(
      base(),
      { type: 'setTaper', taper: { kind: 'chebyshev', sidelobeDb: 30 } },
      { type: 'setSteer', steerDeg: -100 },
    );
    expect(s.taper).toEqual({ kind: 'chebyshev', sidelobeDb: 30 });
    expect(s.steerDeg).toBe(-90);
  });

  it('a new medium brings its speed (Mackenzie 1981 check value 1550.744 m/s, docs/references.md §2)', () => {
    const s = designerReducer(base(), {
      type: 'setMedium',
      medium: { kind: 'sea-water', temperatureC: 25, salinityPpt: 35, depthM: 1000, equation: 'mackenzie-1981' },
    });
    expect(Math.abs(s.propagationSpeedMps! - 1550.744)).toBeLessThan(5e-4);
  });

  it('a spacing in metres keeps its length when the medium changes, so d in λ follows the speed', () => {
    const s0 = normalizeDraft({
      name: 'x',
      elements: 4,
      spacing: { value: 0.75, unit: 'm' },
      frequencyHz: 1000,
      medium: { kind: 'custom', speedMps: 1500 },
    });
    const s = designerReducer(s0, { type: 'setMedium', medium: { kind: 'custom', speedMps: 3000 } });
    expect(s.spacing.value).toBe(0.75);
    expect(draftSpacingWavelengths(s)).toBeCloseTo(0.25, 12);
  });

  it('never mutates its input', () => {
    const s = base();
    const copy = JSON.parse(JSON.stringify(s));
    run(
      s,
      { type: 'toggleElement', index: 1 },
      { type: 'addElement', at: 0 },
      { type: 'setElementGain', index: 0, gainDb: 3 },
      { type: 'addSource', bearingDeg: 3 },
    );
    expect(s).toEqual(copy);
  });
});

describe('enabledSummary', () => {
  it('finds the disabled elements and the longest run of enabled neighbours', () => {
    const states = [true, true, false, true, true, true, false].map((enabled) => ({ enabled, gainDb: 0, phaseDeg: 0 }));
    expect(enabledSummary(states)).toEqual({ enabledCount: 5, disabled: [2, 6], longestRun: { start: 3, length: 3 } });
  });
});
