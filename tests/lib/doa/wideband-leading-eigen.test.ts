import { describe, expect, it } from 'vitest';
import { hermitianEigen } from '@/lib/doa/linalg/hermitian-eigen';
import { zeros, type ComplexMatrix } from '@/lib/doa/linalg/complex';
import { SeededRandom } from '@/lib/doa/sim/simulate';
import { LeadingEigenWorkspace } from '@/lib/doa/wideband/leading-eigen';

/** R = X·Xᴴ/T of T random complex snapshots with `sources` strong rank-one terms (a sample covariance). */
function sampleCovariance(rng: SeededRandom, n: number, t: number, sources: number, power: number): ComplexMatrix {
  const xr = new Float64Array(n * t);
  const xi = new Float64Array(n * t);
  for (let i = 0; i < n * t; i++) {
    xr[i] = rng.normal();
    xi[i] = rng.normal();
  }
  for (let s = 0; s < sources; s++) {
    const mu = 2 * Math.PI * 0.37 * Math.sin(0.4 + 0.7 * s);
    for (let k = 0; k < t; k++) {
      const ar = Math.sqrt(power) * rng.normal();
      const ai = Math.sqrt(power) * rng.normal();
      for (let m = 0; m < n; m++) {
        const c = Math.cos(mu * m);
        const si = Math.sin(mu * m);
        xr[m * t + k] += ar * c - ai * si;
        xi[m * t + k] += ar * si + ai * c;
      }
    }
  }
  const r = zeros(n, n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let sr = 0;
      let si = 0;
      for (let k = 0; k < t; k++) {
        sr += xr[i * t + k] * xr[j * t + k] + xi[i * t + k] * xi[j * t + k];
        si += xi[i * t + k] * xr[j * t + k] - xr[i * t + k] * xi[j * t + k];
      }
      r.re[i * n + j] = sr / t;
      r.im[i * n + j] = si / t;
    }
  }
  return r;
}

/** Largest entry of |Es·Esᴴ − Vs·Vsᴴ| (the signal projectors of the two decompositions). */
function projectorGap(esRe: Float64Array, esIm: Float64Array, v: ComplexMatrix, k: number): number {
  const n = v.rows;
  let worst = 0;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let ar = 0;
      let ai = 0;
      let br = 0;
      let bi = 0;
      for (let s = 0; s < k; s++) {
        ar += esRe[s * n + i] * esRe[s * n + j] + esIm[s * n + i] * esIm[s * n + j];
        ai += esIm[s * n + i] * esRe[s * n + j] - esRe[s * n + i] * esIm[s * n + j];
        br += v.re[i * n + s] * v.re[j * n + s] + v.im[i * n + s] * v.im[j * n + s];
        bi += v.im[i * n + s] * v.re[j * n + s] - v.re[i * n + s] * v.im[j * n + s];
      }
      worst = Math.max(worst, Math.hypot(ar - br, ai - bi));
    }
  }
  return worst;
}

/** max_j ‖(A − λ_j I)·e_j‖ / ‖A‖_max and the largest |e_iᴴe_j − δ_ij|. */
function residuals(a: ComplexMatrix, values: Float64Array, esRe: Float64Array, esIm: Float64Array, k: number) {
  const n = a.rows;
  let scale = 0;
  for (let i = 0; i < n * n; i++) scale = Math.max(scale, Math.hypot(a.re[i], a.im[i]));
  let residual = 0;
  let orthogonality = 0;
  for (let j = 0; j < k; j++) {
    for (let i = 0; i < n; i++) {
      let sr = -values[j] * esRe[j * n + i];
      let si = -values[j] * esIm[j * n + i];
      for (let c = 0; c < n; c++) {
        sr += a.re[i * n + c] * esRe[j * n + c] - a.im[i * n + c] * esIm[j * n + c];
        si += a.re[i * n + c] * esIm[j * n + c] + a.im[i * n + c] * esRe[j * n + c];
      }
      residual = Math.max(residual, Math.hypot(sr, si) / (scale > 0 ? scale : 1));
    }
    for (let p = 0; p <= j; p++) {
      let dr = 0;
      let di = 0;
      for (let i = 0; i < n; i++) {
        dr += esRe[p * n + i] * esRe[j * n + i] + esIm[p * n + i] * esIm[j * n + i];
        di += esRe[p * n + i] * esIm[j * n + i] - esIm[p * n + i] * esRe[j * n + i];
      }
      orthogonality = Math.max(orthogonality, Math.hypot(dr - (p === j ? 1 : 0), di));
    }
  }
  return { residual, orthogonality };
}

function run(a: ComplexMatrix, k: number) {
  const n = a.rows;
  const ws = new LeadingEigenWorkspace(n);
  const values = new Float64Array(n);
  const esRe = new Float64Array(n * n);
  const esIm = new Float64Array(n * n);
  ws.decompose(a.re, a.im, values, k, esRe, esIm);
  return { values, esRe, esIm, ws };
}

describe('leading eigenvectors of a Hermitian matrix (wideband/leading-eigen.ts, inverse iteration)', () => {
  it('sample covariances: eigenvalues those of hermitianEigen within 1e-14 of the largest; Es·Esᴴ its projector within 1e-12', () => {
    const rng = new SeededRandom(2026);
    for (const [n, t, sources, power, k] of [
      [16, 30, 2, 10, 2],
      [16, 30, 2, 1e4, 2],
      [16, 30, 3, 0.3, 3],
      [16, 10, 2, 5, 2], // fewer snapshots than elements: rank-deficient
      [16, 200, 1, 100, 4],
      [6, 40, 2, 3, 2],
      [3, 5, 1, 1, 1],
      [2, 5, 1, 1, 1],
    ] as const) {
      const a = sampleCovariance(rng, n, t, sources, power);
      const ref = hermitianEigen(a);
      const { values, esRe, esIm } = run(a, k);
      for (let i = 0; i < n; i++) expect(Math.abs(values[i] - ref.values[i])).toBeLessThan(1e-14 * ref.values[0]);
      expect(projectorGap(esRe, esIm, ref.vectors, k)).toBeLessThan(1e-12);
      const r = residuals(a, values, esRe, esIm, k);
      expect(r.residual).toBeLessThan(1e-13);
      expect(r.orthogonality).toBeLessThan(1e-14);
    }
  });

  it('degenerate matrices (zero, identity, repeated eigenvalues, 1 × 1) still give orthonormal eigenvectors', () => {
    const n = 16;
    const cases: ComplexMatrix[] = [zeros(n, n), zeros(n, n), zeros(n, n)];
    for (let i = 0; i < n; i++) cases[1].re[i * n + i] = 1;
    // diag(5, 5, 5, 1, …): a triple leading eigenvalue.
    for (let i = 0; i < n; i++) cases[2].re[i * n + i] = i < 3 ? 5 : 1;
    for (const a of cases) {
      const { values, esRe, esIm } = run(a, 3);
      expect(Array.from(values)).toEqual(Array.from(hermitianEigen(a).values));
      const r = residuals(a, values, esRe, esIm, 3);
      expect(r.residual).toBeLessThan(1e-14);
      expect(r.orthogonality).toBeLessThan(1e-14);
    }
    const one = zeros(1, 1);
    one.re[0] = 2.5;
    const { values, esRe } = run(one, 1);
    expect(values[0]).toBe(2.5);
    expect(Math.abs(esRe[0])).toBe(1);
  });

  it('a workspace reused for many matrices gives the same results as a fresh one', () => {
    const rng = new SeededRandom(7);
    const ws = new LeadingEigenWorkspace(16);
    const values = new Float64Array(16);
    const esRe = new Float64Array(256);
    const esIm = new Float64Array(256);
    for (let trial = 0; trial < 5; trial++) {
      const a = sampleCovariance(rng, 16, 30, 2, 4);
      ws.decompose(a.re, a.im, values, 2, esRe, esIm);
      const fresh = run(a, 2);
      expect(Array.from(values)).toEqual(Array.from(fresh.values));
      expect(Array.from(esRe.subarray(0, 32))).toEqual(Array.from(fresh.esRe.subarray(0, 32)));
      expect(Array.from(esIm.subarray(0, 32))).toEqual(Array.from(fresh.esIm.subarray(0, 32)));
    }
  });
});
