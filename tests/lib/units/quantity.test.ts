/**
 * The quantity parser and the shared schemas built on it: a table of accepted
 * inputs with the value expected in the documented unit, and a table of refused
 * inputs with the words the refusal must contain.
 *
 * Expected values are SI prefix and unit definitions (BIPM SI Brochure, 9th
 * edition: k = 1e3, m = 1e−3, µ = 1e−6) and the international inch of 1959
 * (25.4 mm exactly); λ = c/f is common practice (docs/conventions.md §1).
 */
import { describe, expect, it } from 'vitest';
import { parseQuantity, quantitySchema, type QuantityKind } from '@/lib/units/quantity';
import { arrayInputSchema, spacingSchema } from '@/lib/validations/array';

const close = (a: number, b: number) => Math.abs(a - b) <= 1e-12 * Math.max(1, Math.abs(b));

describe('parseQuantity: accepted inputs', () => {
  const accepted: [string | number, QuantityKind, number][] = [
    [1500, 'speed', 1500],
    ['1500', 'speed', 1500],
    ['1.5 km/s', 'speed', 1500],
    ['1500 m/s', 'speed', 1500],
    ['3 kHz', 'frequency', 3000],
    ['3kHz', 'frequency', 3000],
    ['2.5 MHz', 'frequency', 2.5e6],
    ['1500/(2*3000)', 'length', 0.25],
    ['1500/(2*3000) m', 'length', 0.25],
    ['12.5 mm', 'length', 0.0125],
    ['1 inch', 'length', 0.0254],
    ['2 km', 'length', 2000],
    ['250 ms', 'time', 0.25],
    ['2 min', 'time', 120],
    ['3 deg', 'angle', 3],
    ['1e3 Hz', 'frequency', 1000],
    ['  42  ', 'length', 42],
  ];
  it.each(accepted)('%j as a %s is %d in the documented unit', (input, kind, want) => {
    const q = parseQuantity(input, kind);
    expect(close(q.value, want), `${q.value} vs ${want}`).toBe(true);
  });

  it('a spacing in wavelengths stays in wavelengths, or becomes metres when the wavelength is known', () => {
    expect(parseQuantity('0.5 lambda', 'length', { allowWavelength: true })).toEqual({
      value: 0.5,
      unit: 'wavelength',
      withUnit: true,
    });
    expect(parseQuantity('0.5 λ', 'length', { allowWavelength: true }).unit).toBe('wavelength');
    // λ = c/f = 1500/3000 = 0.5 m, so 0.5 λ = 0.25 m.
    expect(parseQuantity('0.5 lambda', 'length', { allowWavelength: true, wavelengthM: 0.5 }).value).toBe(0.25);
  });
});

describe('parseQuantity: refused inputs name what was expected', () => {
  const refused: [string, QuantityKind, RegExp][] = [
    ['3 kPa', 'frequency', /not a frequency: expected units of Hz/],
    ['12.5 mm', 'frequency', /not a frequency/],
    ['3 kHz', 'length', /not a length: expected units of m/],
    ['0.5 lambda', 'length', /not a length/],
    ['', 'speed', /expected a speed such as 1500 m\/s/],
    ['abc', 'length', /could not read "abc" as a length/],
    ['1/0', 'length', /not a finite number/],
    ['x = 3', 'length', /could not read|not a length/],
    ['import({}, {})', 'length', /could not read|import is disabled/],
    ['1'.repeat(201), 'length', /longer than 200 characters/],
  ];
  it.each(refused)('%j as a %s is refused', (input, kind, message) => {
    expect(() => parseQuantity(input, kind)).toThrow(message);
  });
});

describe('the shared schemas (designer form and arrays API)', () => {
  it('quantitySchema names the field and keeps plain numbers in the documented unit', () => {
    const frequency = quantitySchema('frequency', { field: 'frequencyHz', positive: true });
    expect(frequency.parse(3000)).toBe(3000);
    expect(frequency.parse('3 kHz')).toBe(3000);
    const bad = frequency.safeParse('3 kPa');
    expect(bad.success).toBe(false);
    expect(bad.error!.issues[0].message).toBe(
      'frequencyHz: "3 kPa" is not a frequency: expected units of Hz, e.g. 3 kHz',
    );
    expect(frequency.safeParse('-3 kHz').error!.issues[0].message).toBe('frequencyHz must be greater than 0 Hz');
    expect(frequency.safeParse(true).error!.issues[0].message).toMatch(/^frequencyHz: expected a frequency/);
  });

  const spacingCases: [unknown, { value: number; unit: string } | RegExp][] = [
    [
      { value: 0.5, unit: 'wavelength' },
      { value: 0.5, unit: 'wavelength' },
    ],
    [
      { value: '0.5 lambda', unit: 'm' },
      { value: 0.5, unit: 'wavelength' },
    ],
    [
      { value: '12.5 mm', unit: 'wavelength' },
      { value: 0.0125, unit: 'm' },
    ],
    [
      { value: '12.5 mm', unit: 'mm' },
      { value: 12.5, unit: 'mm' },
    ],
    [
      { value: '1500/(2*3000) m', unit: 'wavelength' },
      { value: 0.25, unit: 'm' },
    ],
    [
      { value: '1/4', unit: 'wavelength' },
      { value: 0.25, unit: 'wavelength' },
    ],
    [{ value: '3 kHz', unit: 'm' }, /spacing\.value: "3 kHz" is not a length: expected units of m or wavelengths/],
    [{ value: -1, unit: 'm' }, /spacing\.value must be greater than 0/],
    [{ value: '2e7 m', unit: 'm' }, /spacing\.value is too large/],
    [{ value: 0.5, unit: 'feet' }, /spacing\.unit must be wavelength, m or mm/],
  ];
  it.each(spacingCases)('spacing %j', (input, want) => {
    const r = spacingSchema.safeParse(input);
    if (want instanceof RegExp) {
      expect(r.success).toBe(false);
      expect(r.error!.issues.map((i) => i.message).join(' | ')).toMatch(want);
    } else {
      expect(r.success).toBe(true);
      expect(r.data!.unit).toBe(want.unit);
      expect(close(r.data!.value, want.value)).toBe(true);
    }
  });

  it('the array schema converts frequency, speed and depth, and files each refusal under its field', () => {
    const ok = arrayInputSchema.parse({
      name: 'Units',
      elements: 8,
      spacing: { value: '12.5 mm', unit: 'mm' },
      frequencyHz: '60 kHz',
      medium: { kind: 'sea-water', temperatureC: 10, salinityPpt: 35, depthM: '0.2 km', equation: 'mackenzie-1981' },
    });
    expect(ok.frequencyHz).toBe(60000);
    expect(ok.medium).toMatchObject({ depthM: 200 });
    expect(
      arrayInputSchema.parse({
        name: 'n',
        elements: 4,
        spacing: { value: 1, unit: 'm' },
        frequencyHz: 3000,
        propagationSpeedMps: '1.5 km/s',
      }).propagationSpeedMps,
    ).toBe(1500);

    const bad = arrayInputSchema.safeParse({
      name: 'Units',
      elements: 8,
      spacing: { value: '12.5 kg', unit: 'mm' },
      frequencyHz: '60 km',
      medium: { kind: 'sea-water', temperatureC: 10, salinityPpt: 35, depthM: '12 km', equation: 'mackenzie-1981' },
    });
    expect(bad.success).toBe(false);
    const byPath = Object.fromEntries(bad.error!.issues.map((i) => [i.path.join('.'), i.message]));
    expect(byPath['spacing.value']).toMatch(/^spacing\.value: "12\.5 kg" is not a length/);
    expect(byPath['frequencyHz']).toMatch(/^frequencyHz: "60 km" is not a frequency: expected units of Hz/);
    expect(byPath['medium.depthM']).toBe('medium.depthM must be at most 11000 m');
  });
});
