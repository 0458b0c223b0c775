import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { arrayInputSchema, resolveArrayGeometry, type ArrayInput } from '@/lib/validations/array';

/** Field errors of a failed parse, keyed by the full dotted path. */
function fieldErrors(value: unknown): Record<string, string[]> {
  const r = arrayInputSchema.safeParse(value);
  expect(r.success).toBe(false);
  const out: Record<string, string[]> = {};
  if (!r.success) {
    for (const issue of r.error.issues) {
      const key = issue.path.join('.');
      (out[key] ??= []).push(issue.message);
    }
  }
  return out;
}

const ok = { name: 'Test line', elements: 8, spacing: { value: 0.5, unit: 'wavelength' } };

describe('arrayInputSchema: bad input names the field', () => {
  it('accepts the minimal docs/conventions.md §7 body', () => {
    expect(arrayInputSchema.safeParse(ok).success).toBe(true);
  });

  it('refuses a negative spacing under spacing.value', () => {
    const e = fieldErrors({ ...ok, spacing: { value: -0.5, unit: 'wavelength' } });
    expect(Object.keys(e)).toEqual(['spacing.value']);
    expect(e['spacing.value'][0]).toMatch(/spacing\.value must be greater than 0/);
  });

  it('refuses a zero, infinite or missing spacing value', () => {
    expect(
      Object.keys(
        fieldErrors({ ...ok, spacing: { value: 0, unit: 'm' }, frequencyHz: 1000, propagationSpeedMps: 1500 }),
      ),
    ).toEqual(['spacing.value']);
    expect(Object.keys(fieldErrors({ ...ok, spacing: { value: Infinity, unit: 'wavelength' } }))).toEqual([
      'spacing.value',
    ]);
    expect(fieldErrors({ ...ok, spacing: { unit: 'wavelength' } })['spacing.value'][0]).toMatch(
      /spacing\.value is required/,
    );
  });

  it('refuses one element, naming elements', () => {
    const e = fieldErrors({ ...ok, elements: 1 });
    expect(Object.keys(e)).toEqual(['elements']);
    expect(e.elements[0]).toMatch(/elements must be at least 2/);
  });

  it('refuses a huge element count with a clear message', () => {
    const e = fieldErrors({ ...ok, elements: 1_000_000 });
    expect(Object.keys(e)).toEqual(['elements']);
    expect(e.elements[0]).toMatch(/at most 512; 1000000 is more than the designer supports/);
  });

  it('refuses a fractional element count', () => {
    expect(fieldErrors({ ...ok, elements: 7.5 }).elements[0]).toMatch(/whole number/);
  });

  it('refuses metres without a frequency, naming frequencyHz (and nothing else)', () => {
    const e = fieldErrors({ ...ok, spacing: { value: 0.25, unit: 'm' }, propagationSpeedMps: 1500 });
    expect(Object.keys(e)).toEqual(['frequencyHz']);
    expect(e.frequencyHz[0]).toMatch(/frequencyHz is required when the spacing is given in metres/);
  });

  it('refuses millimetres without a speed, naming propagationSpeedMps', () => {
    const e = fieldErrors({ ...ok, spacing: { value: 50, unit: 'mm' }, frequencyHz: 3e9 });
    expect(Object.keys(e)).toEqual(['propagationSpeedMps']);
  });

  it('refuses elementStates of the wrong length, or with every element disabled', () => {
    const three = Array.from({ length: 3 }, () => ({ enabled: true, gainDb: 0, phaseDeg: 0 }));
    expect(fieldErrors({ ...ok, elements: 4, elementStates: three }).elementStates[0]).toMatch(
      /3 entries but elements is 4/,
    );
    const off = three.map((s) => ({ ...s, enabled: false }));
    expect(fieldErrors({ ...ok, elements: 3, elementStates: off }).elementStates[0]).toMatch(/at least one element/);
  });

  it('refuses bad designer fields with their paths', () => {
    expect(Object.keys(fieldErrors({ ...ok, steerDeg: 120 }))).toEqual(['steerDeg']);
    expect(Object.keys(fieldErrors({ ...ok, taper: { kind: 'chebyshev', sidelobeDb: 2 } }))).toEqual([
      'taper.sidelobeDb',
    ]);
    expect(
      Object.keys(
        fieldErrors({
          ...ok,
          medium: { kind: 'sea-water', temperatureC: 10, salinityPpt: 35, depthM: -5, equation: 'mackenzie-1981' },
        }),
      ),
    ).toEqual(['medium.depthM']);
    expect(Object.keys(fieldErrors({ ...ok, plannedSources: [{ bearingDeg: 95 }] }))).toEqual([
      'plannedSources.0.bearingDeg',
    ]);
    expect(Object.keys(fieldErrors({ ...ok, snapshots: 0 }))).toEqual(['snapshots']);
  });

  it('flattens to top-level keys for a 422 answer (z.flattenError), keeping the field in the message', () => {
    const r = arrayInputSchema.safeParse({ ...ok, spacing: { value: -1, unit: 'wavelength' } });
    expect(r.success).toBe(false);
    if (!r.success) {
      const flat = z.flattenError(r.error).fieldErrors as Record<string, string[]>;
      expect(flat.spacing[0]).toMatch(/spacing\.value/);
    }
  });
});

describe('resolveArrayGeometry against docs/references.md §1–2', () => {
  const parse = (v: unknown): ArrayInput => arrayInputSchema.parse(v);

  it('radio at 3 GHz: λ = 0.0999308 m (docs/references.md §1, c exact by the SI definition)', () => {
    const g = resolveArrayGeometry(
      parse({ ...ok, spacing: { value: 49.965, unit: 'mm' }, frequencyHz: 3e9, medium: { kind: 'radio' } }),
    );
    expect(g.speedMps).toBe(299_792_458);
    expect(g.wavelengthM!).toBeCloseTo(0.0999308, 7);
    // docs/references.md §1 lists λ/2 = 49.965 mm at 3 GHz (rounded to 1 µm).
    expect(g.spacingWavelengths).toBeCloseTo(0.5, 4);
  });

  it('radio at 10 GHz: λ = 0.0299792 m (docs/references.md §1)', () => {
    const g = resolveArrayGeometry(
      parse({ ...ok, spacing: { value: 14.99, unit: 'mm' }, frequencyHz: 1e10, propagationSpeedMps: 299_792_458 }),
    );
    expect(g.wavelengthM!).toBeCloseTo(0.0299792, 7);
    expect(g.spacingWavelengths).toBeCloseTo(0.5, 3);
  });

  it('sea water by Mackenzie (1981): T=25, S=35, D=1000 → 1550.744 m/s (published check value, docs/references.md §2)', () => {
    const g = resolveArrayGeometry(
      parse({
        ...ok,
        spacing: { value: 0.5, unit: 'm' },
        frequencyHz: 1000,
        medium: { kind: 'sea-water', temperatureC: 25, salinityPpt: 35, depthM: 1000, equation: 'mackenzie-1981' },
      }),
    );
    expect(Math.abs(g.speedMps! - 1550.744)).toBeLessThan(5e-4);
    expect(g.wavelengthM!).toBeCloseTo(1.550744, 6);
    expect(g.spacingWavelengths).toBeCloseTo(0.5 / 1.550744, 6);
    expect(g.warnings).toEqual([]);
  });

  it('sea water by UNESCO (1983 coefficients): S=35, T=20, P=0 → 1521.462 m/s (docs/references.md §2, computed)', () => {
    const g = resolveArrayGeometry(
      parse({
        ...ok,
        frequencyHz: 1000,
        medium: { kind: 'sea-water', temperatureC: 20, salinityPpt: 35, depthM: 0, equation: 'unesco-1983' },
      }),
    );
    expect(Math.abs(g.speedMps! - 1521.462)).toBeLessThan(5e-4);
  });

  it('fresh water at 20 °C → 1482.380 m/s (Marczak 1997, docs/references.md §2) and air at 20 °C → 343.215 m/s', () => {
    const fresh = resolveArrayGeometry(
      parse({ ...ok, frequencyHz: 1000, medium: { kind: 'fresh-water', temperatureC: 20 } }),
    );
    expect(Math.abs(fresh.speedMps! - 1482.38)).toBeLessThan(5e-4);
    const air = resolveArrayGeometry(parse({ ...ok, frequencyHz: 1000, medium: { kind: 'air', temperatureC: 20 } }));
    expect(Math.abs(air.speedMps! - 343.215)).toBeLessThan(5e-4);
  });

  it('nominal sonar: 1500 m/s at 10 kHz → λ = 0.15 m (docs/references.md §1, common practice)', () => {
    const g = resolveArrayGeometry(
      parse({
        ...ok,
        spacing: { value: 75, unit: 'mm' },
        frequencyHz: 1e4,
        medium: { kind: 'custom', speedMps: 1500 },
      }),
    );
    expect(g.wavelengthM!).toBeCloseTo(0.15, 12);
    expect(g.spacingWavelengths).toBeCloseTo(0.5, 12);
  });

  it('warns outside the Mackenzie validity range, under the medium field', () => {
    const g = resolveArrayGeometry(
      parse({
        ...ok,
        frequencyHz: 1000,
        medium: { kind: 'sea-water', temperatureC: 35, salinityPpt: 35, depthM: 10, equation: 'mackenzie-1981' },
      }),
    );
    expect(g.warnings.map((w) => w.field)).toEqual(['medium.temperatureC']);
  });

  it('uses propagationSpeedMps when it disagrees with the medium, with a warning', () => {
    const g = resolveArrayGeometry(
      parse({ ...ok, frequencyHz: 1000, propagationSpeedMps: 1500, medium: { kind: 'fresh-water', temperatureC: 20 } }),
    );
    expect(g.speedMps).toBe(1500);
    expect(g.warnings.map((w) => w.code)).toContain('speed-differs-from-medium');
  });

  it('keeps a spacing in wavelengths as given, and says when no frequency is known', () => {
    const g = resolveArrayGeometry(parse({ ...ok, spacing: { value: 0.7, unit: 'wavelength' } }));
    expect(g.spacingWavelengths).toBe(0.7);
    expect(g.wavelengthM).toBeUndefined();
    expect(g.warnings.map((w) => w.code)).toEqual(['no-frequency']);
  });
});
