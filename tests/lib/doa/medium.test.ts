import { describe, expect, it } from 'vitest';
import {
  SPEED_OF_LIGHT_MPS,
  soundSpeedMackenzie,
  soundSpeedUnesco,
  soundSpeedFreshWater,
  soundSpeedAir,
  depthToPressureDbar,
  pressureToDepthM,
  propagationSpeed,
  wavelengthM,
  wavelengthInMedium,
  spacingInWavelengths,
  bearingUnderAssumedSpeed,
} from '@/lib/doa/design/medium';
import { DoaInputError } from '@/lib/doa/errors';
import checkValues from '@/fixtures/doa/check-values.json';

const depthPressure = checkValues.depthPressure;

describe('speed of light and radio wavelengths', () => {
  it('uses the exact SI value', () => {
    // BIPM SI Brochure 9th ed. (2019): c = 299 792 458 m/s exactly (docs/references.md §1, confirmed).
    expect(SPEED_OF_LIGHT_MPS).toBe(299792458);
    expect(propagationSpeed({ kind: 'radio' }).speedMps).toBe(299792458);
  });
  it('gives the docs/references.md §1 wavelengths', () => {
    // docs/references.md §1 [computed]: 3 GHz → 0.0999308 m, 10 GHz → 0.0299792 m, 77 GHz → 3.8934 mm.
    expect(wavelengthM(3e9, SPEED_OF_LIGHT_MPS)).toBeCloseTo(0.0999308, 7);
    expect(wavelengthM(10e9, SPEED_OF_LIGHT_MPS)).toBeCloseTo(0.0299792, 7);
    expect(wavelengthM(77e9, SPEED_OF_LIGHT_MPS) * 1000).toBeCloseTo(3.8934, 4);
    // Sonar at the nominal 1500 m/s (docs/references.md §1 [computed]): 10 kHz → 0.15 m.
    expect(wavelengthInMedium(10e3, { kind: 'custom', speedMps: 1500 }).wavelengthM).toBeCloseTo(0.15, 12);
  });
  it('converts a physical spacing to wavelengths', () => {
    // λ/2 at 3 GHz is 49.965 mm (docs/references.md §1 [computed]).
    expect(spacingInWavelengths(0.049965, 3e9, SPEED_OF_LIGHT_MPS)).toBeCloseTo(0.5, 4);
  });
});

describe('Mackenzie (1981)', () => {
  it('reproduces the published check value', () => {
    // Mackenzie (1981) check value: T=25 °C, S=35, D=1000 m → 1550.744 m/s (docs/references.md §2, confirmed).
    const r = soundSpeedMackenzie(25, 35, 1000);
    expect(r.speedMps).toBeCloseTo(1550.744, 3);
    expect(r.warnings).toEqual([]);
  });
  it('matches the computed table of docs/references.md §2', () => {
    // docs/references.md §2 [computed] from the nine-term formula.
    expect(soundSpeedMackenzie(0, 35, 0).speedMps).toBeCloseTo(1448.96, 3);
    expect(soundSpeedMackenzie(10, 35, 0).speedMps).toBeCloseTo(1489.803, 3);
    expect(soundSpeedMackenzie(20, 35, 0).speedMps).toBeCloseTo(1521.463, 3);
    expect(soundSpeedMackenzie(10, 35, 1000).speedMps).toBeCloseTo(1506.264, 3);
  });
  it('returns validity warnings instead of throwing', () => {
    // Validity T 2–30 °C, S 25–40, D 0–8000 m (Mackenzie 1981, docs/references.md §2); (40,40,10000) → 1718.774 [computed].
    const r = soundSpeedMackenzie(40, 40, 10000);
    expect(r.speedMps).toBeCloseTo(1718.774, 3);
    expect(r.warnings.map((w) => w.field).sort()).toEqual(['depthM', 'temperatureC']);
    expect(
      soundSpeedMackenzie(1, 20, 0)
        .warnings.map((w) => w.field)
        .sort(),
    ).toEqual(['salinityPsu', 'temperatureC']);
  });
});

describe('UNESCO (Chen & Millero 1977, Fofonoff & Millard 1983)', () => {
  it('reproduces the published check value', () => {
    // Fofonoff & Millard (1983) p. 48: S=40, T=40 °C, P=10000 dbar → 1731.995 m/s (docs/references.md §2, confirmed).
    const r = soundSpeedUnesco(40, 40, 10000);
    expect(r.speedMps).toBeCloseTo(1731.995, 3);
    expect(r.warnings).toEqual([]);
  });
  it('matches the computed surface values', () => {
    // docs/references.md §2 [computed, 1983 coefficients]: (35, 20, 0) → 1521.462; (35, 25, 0) → 1534.393.
    expect(soundSpeedUnesco(35, 20, 0).speedMps).toBeCloseTo(1521.462, 3);
    expect(soundSpeedUnesco(35, 25, 0).speedMps).toBeCloseTo(1534.393, 3);
  });
  it('agrees with Mackenzie to within a few tenths of a m/s in the common range', () => {
    // Both are fits to the same measurements; at the surface they agree closely (docs/references.md §2 [computed]:
    // 1521.463 vs 1521.462 at 20 °C). Depth → pressure by Saunders (1981).
    const mk = soundSpeedMackenzie(10, 35, 1000).speedMps;
    const un = propagationSpeed({
      kind: 'sea-water',
      equation: 'unesco',
      temperatureC: 10,
      salinityPsu: 35,
      depthM: 1000,
      latitudeDeg: 45,
    }).speedMps;
    expect(Math.abs(mk - un)).toBeLessThan(0.5);
  });
  it('warns outside its range', () => {
    expect(
      soundSpeedUnesco(35, 45, 12000)
        .warnings.map((w) => w.field)
        .sort(),
    ).toEqual(['pressureDbar', 'temperatureC']);
  });
});

describe('depth and pressure (docs/references.md §2)', () => {
  // The two check values below were first quoted from memory. They are now reproduced from the
  // formulas by the committed generator fixtures/doa/generate_check_values.py (an independent
  // Python evaluation, fixtures/doa/check-values.json), and compared with TEOS-10 (IOC, SCOR &
  // IAPSO 2010) as computed by the Gibbs SeaWater package gsw, an outside implementation.
  it('Fofonoff & Millard (1983): P = 10000 dbar at 30° → 9712.653 m (value from memory, reproduced by the generator)', () => {
    expect(pressureToDepthM(10000, 30)).toBeCloseTo(9712.653, 3);
    for (const [p, lat, z] of depthPressure.fofonoffMillard) {
      expect(Math.abs(pressureToDepthM(p, lat) - z) / z).toBeLessThan(1e-12);
    }
  });
  it('Saunders (1981): 7321.45 m at 30° → 7500 dbar to 0.01 dbar (value from memory, reproduced by the generator)', () => {
    expect(Math.abs(depthToPressureDbar(7321.45, 30) - 7500)).toBeLessThan(0.01);
    for (const [z, lat, p] of depthPressure.saunders) {
      expect(Math.abs(depthToPressureDbar(z, lat) - p) / p).toBeLessThan(1e-12);
    }
  });
  it('both conversions agree with TEOS-10 (gsw z_from_p / p_from_z) to 0.05 %', () => {
    // TEOS-10 integrates the real ocean's specific volume, the 1983 formulas a standard ocean
    // (0 °C, 35 psu); at 10000 dbar they differ by 1.08 m (0.011 %), at 7321 m by 1.8 dbar (0.024 %).
    for (const [p, lat, z] of depthPressure.teos10.pressureToDepthM) {
      expect(Math.abs(pressureToDepthM(p, lat) - z) / z).toBeLessThan(5e-4);
    }
    for (const [z, lat, p] of depthPressure.teos10.depthToPressureDbar) {
      expect(Math.abs(depthToPressureDbar(z, lat) - p) / p).toBeLessThan(5e-4);
    }
  });
  it('the two conversions are inverse to 0.1 % (consistency check)', () => {
    for (const z of [10, 500, 2000, 6000]) {
      const p = depthToPressureDbar(z, 45);
      expect(Math.abs(pressureToDepthM(p, 45) - z) / z).toBeLessThan(1e-3);
    }
  });
});

describe('fresh water and air', () => {
  it('Marczak (1997) polynomial values', () => {
    // docs/references.md §2 [computed from the confirmed coefficients]: 0 °C → 1402.385, 20 °C → 1482.380, 25 °C → 1496.728.
    expect(soundSpeedFreshWater(0).speedMps).toBeCloseTo(1402.385, 3);
    expect(soundSpeedFreshWater(20).speedMps).toBeCloseTo(1482.38, 3);
    expect(soundSpeedFreshWater(25).speedMps).toBeCloseTo(1496.728, 3);
    expect(soundSpeedFreshWater(120).warnings).toHaveLength(1);
  });
  it('air at 20 °C', () => {
    // docs/references.md §2: 331.3·√(1 + T/273.15) gives 343.215 m/s at 20 °C [computed]; 343 m/s is the common figure.
    expect(soundSpeedAir(20).speedMps).toBeCloseTo(343.215, 3);
    expect(propagationSpeed({ kind: 'air', temperatureC: 20 }).speedMps).toBeCloseTo(343.215, 3);
  });
});

describe('sound-speed assumption', () => {
  it('reads a 30° bearing wrongly when c is assumed 1500 m/s', () => {
    // docs/references.md §2 [computed]: c_true = 1550 → 28.939°, c_true = 1450 → 31.147°.
    expect(bearingUnderAssumedSpeed(30, 1550, 1500).bearingDeg).toBeCloseTo(28.939, 3);
    expect(bearingUnderAssumedSpeed(30, 1450, 1500).bearingDeg).toBeCloseTo(31.147, 3);
    expect(bearingUnderAssumedSpeed(30, 1500, 1500).errorDeg).toBeCloseTo(0, 12);
  });
  it('flags a clipped sine near endfire', () => {
    const r = bearingUnderAssumedSpeed(85, 1450, 1550);
    expect(r.clipped).toBe(true);
    expect(r.bearingDeg).toBe(90);
  });
});

describe('bad input', () => {
  it('names the argument', () => {
    expect(() => soundSpeedMackenzie(Number.NaN, 35, 0)).toThrow(/temperatureC/);
    expect(() => soundSpeedMackenzie(10, 35, -5)).toThrow(/depthM/);
    expect(() => soundSpeedUnesco(35, 10, Infinity)).toThrow(/pressureDbar/);
    expect(() => wavelengthM(0, 1500)).toThrow(/frequencyHz/);
    expect(() => wavelengthM(1000, -1)).toThrow(/speedMps/);
    expect(() => propagationSpeed({ kind: 'custom', speedMps: 0 })).toThrow(/medium.speedMps/);
    expect(() => propagationSpeed({ kind: 'plasma' } as never)).toThrow(DoaInputError);
    expect(() =>
      propagationSpeed({ kind: 'sea-water', equation: 'unesco', temperatureC: 10, salinityPsu: 35 }),
    ).toThrow(/pressureDbar or depthM/);
    expect(() => soundSpeedAir(-300)).toThrow(/temperatureC/);
    expect(() => bearingUnderAssumedSpeed(120, 1500, 1500)).toThrow(/trueBearingDeg/);
  });
});
