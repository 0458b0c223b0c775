// Shared test helpers for lib/doa (not a test file itself).
import { ComplexMatrix, ComplexVector, zeros } from '@/lib/doa/linalg/complex';

export interface JsonMatrix {
  rows: number;
  cols: number;
  re: number[];
  im: number[];
}
export interface JsonVector {
  re: number[];
  im: number[];
}

export function matrixFromJson(c: JsonMatrix): ComplexMatrix {
  return { rows: c.rows, cols: c.cols, re: Float64Array.from(c.re), im: Float64Array.from(c.im) };
}

export function vectorFromJson(c: JsonVector): ComplexVector {
  return { re: Float64Array.from(c.re), im: Float64Array.from(c.im) };
}

export function maxAbsDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  if (a.length !== b.length) return Infinity;
  let e = 0;
  for (let i = 0; i < a.length; i++) e = Math.max(e, Math.abs(a[i] - b[i]));
  return e;
}

/** Largest distance from a point of `a` to its nearest point in `b` (both ways). */
export function setDistance(a: ComplexVector, b: ComplexVector): number {
  const one = (p: ComplexVector, q: ComplexVector) => {
    let e = 0;
    for (let i = 0; i < p.re.length; i++) {
      let best = Infinity;
      for (let j = 0; j < q.re.length; j++) best = Math.min(best, Math.hypot(p.re[i] - q.re[j], p.im[i] - q.im[j]));
      e = Math.max(e, best);
    }
    return e;
  };
  return Math.max(one(a, b), one(b, a));
}

/** Steering matrix A (M × K), a_m(θ) = exp(j·2π·d·m·sin θ) (docs/conventions.md §1). */
export function steeringMatrix(m: number, d: number, bearingsDeg: number[]): ComplexMatrix {
  const a = zeros(m, bearingsDeg.length);
  bearingsDeg.forEach((b, k) => {
    const mu = 2 * Math.PI * d * Math.sin((b * Math.PI) / 180);
    for (let i = 0; i < m; i++) {
      a.re[i * a.cols + k] = Math.cos(mu * i);
      a.im[i * a.cols + k] = Math.sin(mu * i);
    }
  });
  return a;
}

/** Exact covariance R = A·P·Aᴴ + σ²·I. */
export function exactCovariance(
  m: number,
  d: number,
  bearingsDeg: number[],
  powers: number[],
  noise: number,
): ComplexMatrix {
  const a = steeringMatrix(m, d, bearingsDeg);
  const r = zeros(m, m);
  for (let i = 0; i < m; i++) {
    for (let k = 0; k < m; k++) {
      let sr = 0;
      let si = 0;
      for (let s = 0; s < bearingsDeg.length; s++) {
        const ar = a.re[i * a.cols + s];
        const ai = a.im[i * a.cols + s];
        const br = a.re[k * a.cols + s];
        const bi = -a.im[k * a.cols + s];
        sr += powers[s] * (ar * br - ai * bi);
        si += powers[s] * (ar * bi + ai * br);
      }
      r.re[i * m + k] = sr + (i === k ? noise : 0);
      r.im[i * m + k] = si;
    }
  }
  return r;
}

/** Closed-form single-source stochastic CRB std in degrees (docs/references.md §5, Stoica & Nehorai 1990). */
export function singleSourceStochasticCrbDeg(m: number, n: number, snr: number, d = 0.5, thetaDeg = 0): number {
  const k = 2 * Math.PI * d * Math.cos((thetaDeg * Math.PI) / 180);
  const det = 6 / (n * snr * m * (m * m - 1) * k * k);
  return (Math.sqrt(det * (1 + 1 / (m * snr))) * 180) / Math.PI;
}

/** Least-squares slope of log(y) against log(x). */
export function logLogSlope(x: number[], y: number[]): number {
  const lx = x.map(Math.log);
  const ly = y.map(Math.log);
  const mx = lx.reduce((a, b) => a + b, 0) / lx.length;
  const my = ly.reduce((a, b) => a + b, 0) / ly.length;
  let num = 0;
  let den = 0;
  for (let i = 0; i < lx.length; i++) {
    num += (lx[i] - mx) * (ly[i] - my);
    den += (lx[i] - mx) ** 2;
  }
  return num / den;
}
