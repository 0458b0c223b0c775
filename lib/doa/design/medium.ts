/**
 * Propagation media: speed of propagation and wavelength.
 *
 * Units: speeds in m/s, frequencies in Hz, wavelengths in m, temperatures in °C,
 * salinity in practical salinity units (≈ parts per thousand), depth in m (positive
 * down), pressure in decibar (gauge, 0 at the sea surface), latitude in degrees.
 * Bearings (only in `bearingUnderAssumedSpeed`) are degrees from broadside, as in
 * docs/conventions.md §1.
 *
 * Speed formulas (each named beside its function):
 *  - radio: the SI speed of light, exact by definition (BIPM SI Brochure, 9th ed.);
 *  - sea water: Mackenzie (1981), JASA 70(3):807–812, from temperature, salinity
 *    and depth; or UNESCO (Chen & Millero 1977) as coded in Fofonoff & Millard
 *    (1983), UNESCO Tech. Pap. Mar. Sci. 44, from salinity, temperature (IPTS-68)
 *    and pressure;
 *  - fresh water: Marczak (1997) fifth-order polynomial in temperature;
 *  - air: the dry-air ideal-gas law written as c = 331.3·√(1 + T/273.15) m/s;
 *  - custom: a speed the user gives.
 * A value outside a formula's validity range still gets computed; the function
 * returns warnings (never throws) so the caller can show them. Bad arguments
 * (NaN, Inf, negative depth…) throw DoaInputError naming the argument.
 */
import { DoaInputError } from '../errors';
import { requireFinite, requireNonNegative, requirePositive, requireInRange, requireBearing } from '../checks';
import { RAD_PER_DEG } from '../angles';

/** Speed of light in vacuum, m/s, exact by the 2019 SI definition. */
export const SPEED_OF_LIGHT_MPS = 299_792_458;

/** Nominal speeds (common practice) for quick estimates. */
export const NOMINAL_SEA_WATER_SPEED_MPS = 1500;

export interface MediumWarning {
  code: 'outside-validity-range';
  /** The input that lies outside the range, e.g. 'temperatureC'. */
  field: string;
  message: string;
}

export interface SpeedResult {
  speedMps: number;
  /** Which published formula produced the value. */
  formula: string;
  warnings: MediumWarning[];
}

function rangeWarning(
  warnings: MediumWarning[],
  field: string,
  value: number,
  lo: number,
  hi: number,
  formula: string,
  unit: string,
): void {
  if (value < lo || value > hi) {
    warnings.push({
      code: 'outside-validity-range',
      field,
      message: `${field} = ${value} ${unit} lies outside the ${formula} validity range ${lo}–${hi} ${unit}; the speed is extrapolated`,
    });
  }
}

/**
 * Mackenzie (1981) nine-term equation for sound speed in sea water.
 * Validity: T 2–30 °C, S 25–40, D 0–8000 m (warnings outside); standard error ≈ 0.07 m/s.
 * Published check value: T=25, S=35, D=1000 → 1550.744 m/s.
 */
export function soundSpeedMackenzie(temperatureC: number, salinityPsu: number, depthM: number): SpeedResult {
  const t = requireFinite(temperatureC, 'temperatureC');
  const s = requireNonNegative(salinityPsu, 'salinityPsu');
  const d = requireNonNegative(depthM, 'depthM');
  const warnings: MediumWarning[] = [];
  rangeWarning(warnings, 'temperatureC', t, 2, 30, 'Mackenzie (1981)', '°C');
  rangeWarning(warnings, 'salinityPsu', s, 25, 40, 'Mackenzie (1981)', 'psu');
  rangeWarning(warnings, 'depthM', d, 0, 8000, 'Mackenzie (1981)', 'm');
  const ds = s - 35;
  const speedMps =
    1448.96 +
    4.591 * t -
    5.304e-2 * t * t +
    2.374e-4 * t * t * t +
    1.34 * ds +
    1.63e-2 * d +
    1.675e-7 * d * d -
    1.025e-2 * t * ds -
    7.139e-13 * t * d * d * d;
  return { speedMps, formula: 'Mackenzie (1981)', warnings };
}

/**
 * UNESCO sound speed in sea water: Chen & Millero (1977) as coded in Fofonoff &
 * Millard (1983), eqs. 33–37 (pressure converted from dbar to bar inside).
 * Inputs: salinity (psu), temperature (°C, IPTS-68), pressure (dbar).
 * Validity (Fofonoff & Millard 1983): S 0–40, T 0–40 °C, P 0–10000 dbar (warnings outside).
 * Check value (Fofonoff & Millard 1983, p. 48): S=40, T=40, P=10000 → 1731.995 m/s.
 */
export function soundSpeedUnesco(salinityPsu: number, temperatureC: number, pressureDbar: number): SpeedResult {
  const s = requireNonNegative(salinityPsu, 'salinityPsu');
  const t = requireFinite(temperatureC, 'temperatureC');
  const pDbar = requireNonNegative(pressureDbar, 'pressureDbar');
  const warnings: MediumWarning[] = [];
  const formula = 'UNESCO (Chen & Millero 1977; Fofonoff & Millard 1983)';
  rangeWarning(warnings, 'salinityPsu', s, 0, 40, formula, 'psu');
  rangeWarning(warnings, 'temperatureC', t, 0, 40, formula, '°C');
  rangeWarning(warnings, 'pressureDbar', pDbar, 0, 10000, formula, 'dbar');
  const p = pDbar / 10; // bar
  const p2 = p * p;
  const p3 = p2 * p;
  const t2 = t * t;
  const t3 = t2 * t;
  const t4 = t3 * t;
  const t5 = t4 * t;
  // Pure-water term Cw(T, P), eq. 34.
  const cw =
    1402.388 +
    5.03711 * t -
    5.80852e-2 * t2 +
    3.342e-4 * t3 -
    1.478e-6 * t4 +
    3.1464e-9 * t5 +
    (0.153563 + 6.8982e-4 * t - 8.1788e-6 * t2 + 1.3621e-7 * t3 - 6.1185e-10 * t4) * p +
    (3.126e-5 - 1.7107e-6 * t + 2.5974e-8 * t2 - 2.5335e-10 * t3 + 1.0405e-12 * t4) * p2 +
    (-9.7729e-9 + 3.8504e-10 * t - 2.3643e-12 * t2) * p3;
  // Linear salinity coefficient A(T, P), eq. 35.
  const a =
    1.389 -
    1.262e-2 * t +
    7.164e-5 * t2 +
    2.006e-6 * t3 -
    3.21e-8 * t4 +
    (9.4742e-5 - 1.258e-5 * t - 6.4885e-8 * t2 + 1.0507e-8 * t3 - 2.0122e-10 * t4) * p +
    (-3.9064e-7 + 9.1041e-9 * t - 1.6002e-10 * t2 + 7.988e-12 * t3) * p2 +
    (1.1e-10 + 6.649e-12 * t - 3.389e-13 * t2) * p3;
  // S^(3/2) coefficient B(T, P), eq. 36, and S² coefficient D(P), eq. 37.
  const b = -1.922e-2 - 4.42e-5 * t + (7.3637e-5 + 1.7945e-7 * t) * p;
  const dd = 1.727e-3 - 7.9836e-6 * p;
  const speedMps = cw + a * s + b * s * Math.sqrt(s) + dd * s * s;
  return { speedMps, formula, warnings };
}

/**
 * Depth (m) → pressure (dbar) by Saunders (1981), J. Phys. Oceanogr. 11:573–574:
 *   c1 = (5.92 + 5.25·sin²φ)·1e−3,
 *   p = [(1 − c1) − √((1 − c1)² − 8.84e−6·z)] / 4.42e−6.
 * The formula is quoted from memory; the tests check it against the inverse
 * conversion of Fofonoff & Millard (1983) (`pressureToDepthM`). Latitude defaults to 45°.
 */
export function depthToPressureDbar(depthM: number, latitudeDeg = 45): number {
  const z = requireNonNegative(depthM, 'depthM');
  const lat = requireInRange(latitudeDeg, 'latitudeDeg', -90, 90);
  const s = Math.sin(lat * RAD_PER_DEG);
  const c1 = (5.92 + 5.25 * s * s) * 1e-3;
  const disc = (1 - c1) * (1 - c1) - 8.84e-6 * z;
  if (disc < 0)
    throw new DoaInputError('bad-value', `depthM = ${z} m is beyond the range of the Saunders (1981) conversion`);
  return (1 - c1 - Math.sqrt(disc)) / 4.42e-6;
}

/**
 * Pressure (dbar) → depth (m) by Fofonoff & Millard (1983) §8 (the standard
 * ocean, 0 °C and 35 psu, with latitude-dependent gravity).
 * Check value quoted from memory: P = 10000 dbar, latitude 30° → 9712.653 m.
 */
export function pressureToDepthM(pressureDbar: number, latitudeDeg = 45): number {
  const p = requireNonNegative(pressureDbar, 'pressureDbar');
  const lat = requireInRange(latitudeDeg, 'latitudeDeg', -90, 90);
  const x = Math.sin(lat * RAD_PER_DEG) ** 2;
  const gravity = 9.780318 * (1 + (5.2788e-3 + 2.36e-5 * x) * x) + 1.092e-6 * p;
  const numerator = (((-1.82e-15 * p + 2.279e-10) * p - 2.2512e-5) * p + 9.72659) * p;
  return numerator / gravity;
}

/**
 * Sound speed in pure (fresh) water by Marczak (1997), valid 0–95 °C (warning outside):
 * c = 1402.385 + 5.038813T − 5.799136e−2T² + 3.287156e−4T³ − 1.398845e−6T⁴ + 2.787860e−9T⁵.
 */
export function soundSpeedFreshWater(temperatureC: number): SpeedResult {
  const t = requireFinite(temperatureC, 'temperatureC');
  const warnings: MediumWarning[] = [];
  rangeWarning(warnings, 'temperatureC', t, 0, 95, 'Marczak (1997)', '°C');
  const speedMps =
    1402.385 + t * (5.038813 + t * (-5.799136e-2 + t * (3.287156e-4 + t * (-1.398845e-6 + t * 2.78786e-9))));
  return { speedMps, formula: 'Marczak (1997)', warnings };
}

/**
 * Sound speed in dry air: c = 331.3·√(1 + T/273.15) m/s (ideal gas, 331.3 m/s at 0 °C).
 * Humidity and pressure are ignored. Warning outside −40…60 °C (the range where
 * the dry ideal-gas value is a fair engineering estimate; common practice).
 */
export function soundSpeedAir(temperatureC: number): SpeedResult {
  const t = requireFinite(temperatureC, 'temperatureC');
  if (t <= -273.15) throw new DoaInputError('bad-value', `temperatureC must be above −273.15 °C, got ${t}`);
  const warnings: MediumWarning[] = [];
  rangeWarning(warnings, 'temperatureC', t, -40, 60, 'dry-air ideal-gas', '°C');
  return { speedMps: 331.3 * Math.sqrt(1 + t / 273.15), formula: 'dry air, 331.3·√(1 + T/273.15)', warnings };
}

/** A propagation medium as the designer describes it. */
export type Medium =
  | { kind: 'radio' }
  | { kind: 'sea-water'; equation?: 'mackenzie'; temperatureC: number; salinityPsu: number; depthM: number }
  | {
      kind: 'sea-water';
      equation: 'unesco';
      temperatureC: number;
      salinityPsu: number;
      depthM?: number;
      pressureDbar?: number;
      latitudeDeg?: number;
    }
  | { kind: 'fresh-water'; temperatureC: number }
  | { kind: 'air'; temperatureC: number }
  | { kind: 'custom'; speedMps: number };

/**
 * Propagation speed of a medium. Sea water defaults to Mackenzie (1981); with
 * `equation: 'unesco'` give `pressureDbar`, or `depthM` (converted by Saunders 1981
 * at `latitudeDeg`, default 45°).
 */
export function propagationSpeed(medium: Medium): SpeedResult {
  if (medium === null || typeof medium !== 'object')
    throw new DoaInputError('bad-option', 'medium must be an object with a kind');
  switch (medium.kind) {
    case 'radio':
      return { speedMps: SPEED_OF_LIGHT_MPS, formula: 'SI speed of light (exact)', warnings: [] };
    case 'sea-water': {
      if (medium.equation === undefined || medium.equation === 'mackenzie') {
        return soundSpeedMackenzie(medium.temperatureC, medium.salinityPsu, medium.depthM);
      }
      if (medium.equation === 'unesco') {
        let pressure: number;
        if (medium.pressureDbar !== undefined) pressure = medium.pressureDbar;
        else if (medium.depthM !== undefined) pressure = depthToPressureDbar(medium.depthM, medium.latitudeDeg ?? 45);
        else throw new DoaInputError('bad-option', 'medium: the UNESCO equation needs pressureDbar or depthM');
        return soundSpeedUnesco(medium.salinityPsu, medium.temperatureC, pressure);
      }
      throw new DoaInputError(
        'bad-option',
        `medium.equation must be 'mackenzie' or 'unesco', got ${String((medium as { equation: unknown }).equation)}`,
      );
    }
    case 'fresh-water':
      return soundSpeedFreshWater(medium.temperatureC);
    case 'air':
      return soundSpeedAir(medium.temperatureC);
    case 'custom':
      return { speedMps: requirePositive(medium.speedMps, 'medium.speedMps'), formula: 'custom speed', warnings: [] };
    default:
      throw new DoaInputError(
        'bad-option',
        `medium.kind must be radio, sea-water, fresh-water, air or custom, got ${String((medium as { kind: unknown }).kind)}`,
      );
  }
}

/** λ = c / f, in metres. */
export function wavelengthM(frequencyHz: number, speedMps: number): number {
  return requirePositive(speedMps, 'speedMps') / requirePositive(frequencyHz, 'frequencyHz');
}

/** Wavelength for a medium, with the speed and any validity warnings. */
export function wavelengthInMedium(frequencyHz: number, medium: Medium): SpeedResult & { wavelengthM: number } {
  const speed = propagationSpeed(medium);
  return { ...speed, wavelengthM: wavelengthM(frequencyHz, speed.speedMps) };
}

/** Spacing in wavelengths from a physical spacing (m), a frequency and a speed. */
export function spacingInWavelengths(spacingM: number, frequencyHz: number, speedMps: number): number {
  return requirePositive(spacingM, 'spacingM') / wavelengthM(frequencyHz, speedMps);
}

/**
 * The sound-speed assumption effect (docs/references.md §2, §11): an array with physical
 * spacing processed with an assumed speed reads sin θ scaled by c_assumed / c_true,
 * because the phase step 2π·f·x·sinθ/c_true is divided by 2π·f·x/c_assumed.
 * Returns the bearing read (degrees) and whether sin θ had to be clipped to ±1.
 */
export function bearingUnderAssumedSpeed(
  trueBearingDeg: number,
  trueSpeedMps: number,
  assumedSpeedMps: number,
): { bearingDeg: number; errorDeg: number; clipped: boolean } {
  const theta = requireBearing(trueBearingDeg, 'trueBearingDeg');
  const cTrue = requirePositive(trueSpeedMps, 'trueSpeedMps');
  const cAssumed = requirePositive(assumedSpeedMps, 'assumedSpeedMps');
  const u = (Math.sin(theta * RAD_PER_DEG) * cAssumed) / cTrue;
  const clipped = u > 1 || u < -1;
  const bearingDeg = Math.asin(Math.max(-1, Math.min(1, u))) / RAD_PER_DEG;
  return { bearingDeg, errorDeg: bearingDeg - theta, clipped };
}
