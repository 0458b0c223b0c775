/**
 * Angle conventions (docs/conventions.md §1).
 *
 * Element m (m = 0 … M−1) sits at x_m = m·d, d in wavelengths. A bearing θ is
 * in degrees from broadside, in [−90, 90], positive toward larger m. Time
 * dependence exp(+jωt); steering vector a_m(θ) = exp(+j·2π·d·m·sin θ); the
 * electrical angle is μ = 2π·d·sin θ (radians). Every electrical angle maps
 * back as θ = asin(clip(μ / (2π·d), −1, 1)); a clip is reported.
 */
import { ComplexVector } from './linalg/complex';

/** The one degree constant of lib/doa: radians per degree (θ_rad = θ_deg · RAD_PER_DEG). */
export const RAD_PER_DEG = Math.PI / 180;

/** μ = 2π·d·sin θ, θ in degrees. */
export function electricalAngle(bearingDeg: number, spacingWavelengths: number): number {
  return 2 * Math.PI * spacingWavelengths * Math.sin(bearingDeg * RAD_PER_DEG);
}

/** θ = asin(clip(μ/(2π·d), −1, 1)) in degrees, and whether the clip was active. */
export function electricalAngleToBearing(
  mu: number,
  spacingWavelengths: number,
): { bearingDeg: number; clipped: boolean } {
  const u = mu / (2 * Math.PI * spacingWavelengths);
  const clipped = u > 1 || u < -1;
  const c = u > 1 ? 1 : u < -1 ? -1 : u;
  return { bearingDeg: Math.asin(c) / RAD_PER_DEG, clipped };
}

/** Maps electrical angles to bearings sorted ascending; counts the clipped ones. */
export function bearingsFromElectricalAngles(
  mus: ArrayLike<number>,
  spacingWavelengths: number,
): { bearingsDeg: number[]; clippedCount: number } {
  const bearingsDeg: number[] = [];
  let clippedCount = 0;
  for (let i = 0; i < mus.length; i++) {
    const r = electricalAngleToBearing(mus[i], spacingWavelengths);
    if (r.clipped) clippedCount++;
    bearingsDeg.push(r.bearingDeg);
  }
  bearingsDeg.sort((a, b) => a - b);
  return { bearingsDeg, clippedCount };
}

/** a(θ), length `elements`, split re/im. */
export function steeringVector(elements: number, spacingWavelengths: number, bearingDeg: number): ComplexVector {
  const re = new Float64Array(elements);
  const im = new Float64Array(elements);
  const mu = electricalAngle(bearingDeg, spacingWavelengths);
  for (let m = 0; m < elements; m++) {
    re[m] = Math.cos(mu * m);
    im[m] = Math.sin(mu * m);
  }
  return { re, im };
}
