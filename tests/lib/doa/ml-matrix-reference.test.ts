/**
 * ml-matrix (mljs/matrix) as an independent reference for lib/doa's own linear
 * algebra: a second implementation, written by others, of the same
 * decompositions. Tolerances are stated beside each check.
 *
 * - Hermitian EVD: the real 2n × 2n embedding E = [[Re A, −Im A], [Im A, Re A]]
 *   of a Hermitian A is real symmetric; its eigenvalues are those of A, each
 *   twice, and the eigenspace of λ is spanned by [Re v; Im v] and [−Im v; Re v]
 *   for the eigenvector v of A (common practice; Golub & Van Loan, Matrix
 *   Computations, 4th ed., §8.1, complex Hermitian problems as real ones).
 * - Real symmetric EVD (Unitary ESPRIT's): against ml-matrix's symmetric EVD.
 * - Least squares: lib/doa's complex least squares against ml-matrix's QR
 *   solve of the embedded real problem; the studies' log–log slope against
 *   ml-matrix's solve of the normal design [1, log x].
 */
import { describe, expect, it } from 'vitest';
import { EigenvalueDecomposition, Matrix, solve } from 'ml-matrix';
import { hermitianEigen } from '@/lib/doa/linalg/hermitian-eigen';
import { symmetricEigen } from '@/lib/doa/linalg/symmetric-eigen';
import { leastSquares } from '@/lib/doa/linalg/pseudo-inverse';
import type { ComplexMatrix } from '@/lib/doa/linalg/complex';
import { SeededRandom, simulateSnapshots } from '@/lib/doa/sim/simulate';
import { logLogSlope } from '@/lib/studies/monte-carlo';

function randomComplex(rows: number, cols: number, rng: SeededRandom): ComplexMatrix {
  const re = new Float64Array(rows * cols);
  const im = new Float64Array(rows * cols);
  for (let i = 0; i < re.length; i++) [re[i], im[i]] = [rng.normal(), rng.normal()];
  return { rows, cols, re, im };
}

/** B·Bᴴ/cols + I: Hermitian positive definite with spread eigenvalues. */
function randomHermitian(n: number, rng: SeededRandom): ComplexMatrix {
  const b = randomComplex(n, n + 3, rng);
  const re = new Float64Array(n * n);
  const im = new Float64Array(n * n);
  for (let i = 0; i < n; i++)
    for (let k = 0; k < n; k++) {
      let sr = i === k ? 1 : 0;
      let si = 0;
      for (let t = 0; t < b.cols; t++) {
        const [ar, ai] = [b.re[i * b.cols + t], b.im[i * b.cols + t]];
        const [cr, ci] = [b.re[k * b.cols + t], -b.im[k * b.cols + t]];
        sr += (ar * cr - ai * ci) / b.cols;
        si += (ar * ci + ai * cr) / b.cols;
      }
      re[i * n + k] = sr;
      im[i * n + k] = si;
    }
  return { rows: n, cols: n, re, im };
}

function embed(a: ComplexMatrix): Matrix {
  const { rows: m, cols: n } = a;
  const e = Matrix.zeros(2 * m, 2 * n);
  for (let i = 0; i < m; i++)
    for (let k = 0; k < n; k++) {
      const r = a.re[i * n + k];
      const c = a.im[i * n + k];
      e.set(i, k, r);
      e.set(i, n + k, -c);
      e.set(m + i, k, c);
      e.set(m + i, n + k, r);
    }
  return e;
}

/** Sample covariance X·Xᴴ/N of simulated snapshots (two sources, 8 elements). */
function sampleCovariance(): ComplexMatrix {
  const x = simulateSnapshots({
    elements: 8,
    spacingWavelengths: 0.5,
    bearingsDeg: [-20, 14],
    noisePower: 0.1,
    snapshots: 100,
    seed: 3,
  });
  const b = x;
  const n = b.rows;
  const re = new Float64Array(n * n);
  const im = new Float64Array(n * n);
  for (let i = 0; i < n; i++)
    for (let k = 0; k < n; k++) {
      let sr = 0;
      let si = 0;
      for (let t = 0; t < b.cols; t++) {
        const [ar, ai] = [b.re[i * b.cols + t], b.im[i * b.cols + t]];
        const [cr, ci] = [b.re[k * b.cols + t], -b.im[k * b.cols + t]];
        sr += ar * cr - ai * ci;
        si += ar * ci + ai * cr;
      }
      re[i * n + k] = sr / b.cols;
      im[i * n + k] = si / b.cols;
    }
  return { rows: n, cols: n, re, im };
}

describe('Hermitian EVD of lib/doa against ml-matrix on the real embedding', () => {
  const rng = new SeededRandom(20261204);
  const cases: [string, ComplexMatrix][] = [
    ['1 × 1', randomHermitian(1, rng)],
    ['4 × 4', randomHermitian(4, rng)],
    ['16 × 16', randomHermitian(16, rng)],
    ['sample covariance, 8 elements', sampleCovariance()],
  ];
  it.each(cases)('%s: eigenvalues equal (each twice in the embedding) and eigenspaces agree', (_, a) => {
    const n = a.rows;
    const ours = hermitianEigen(a);
    const ref = new EigenvalueDecomposition(embed(a), { assumeSymmetric: true });
    const refValues = [...ref.realEigenvalues];
    const order = refValues.map((_, i) => i).sort((i, j) => refValues[j] - refValues[i]);
    const scale = Math.max(...refValues.map(Math.abs));
    // Tolerance: 1e−12 of the largest eigenvalue (both are backward stable; n ≤ 32 here).
    for (let i = 0; i < n; i++) {
      expect(Math.abs(ours.values[i] - refValues[order[2 * i]])).toBeLessThanOrEqual(1e-12 * scale);
      expect(Math.abs(ours.values[i] - refValues[order[2 * i + 1]])).toBeLessThanOrEqual(1e-12 * scale);
    }
    // Eigenspaces: each ml-matrix eigenvector for λ_i lies in span{[Re v; Im v], [−Im v; Re v]}
    // (when λ_i is simple), residual ≤ 1e−8 (eigenvector accuracy ~ ε·‖A‖ / gap).
    const w = ref.eigenvectorMatrix;
    for (let i = 0; i < n; i++) {
      const gap = Math.min(
        i > 0 ? ours.values[i - 1] - ours.values[i] : Infinity,
        i < n - 1 ? ours.values[i] - ours.values[i + 1] : Infinity,
      );
      if (gap < 1e-3 * scale) continue;
      const x = new Float64Array(2 * n);
      const y = new Float64Array(2 * n);
      for (let m = 0; m < n; m++) {
        const [vr, vi] = [ours.vectors.re[m * n + i], ours.vectors.im[m * n + i]];
        [x[m], x[n + m]] = [vr, vi];
        [y[m], y[n + m]] = [-vi, vr];
      }
      for (const col of [order[2 * i], order[2 * i + 1]]) {
        const v = w.getColumn(col);
        const norm = Math.hypot(...v);
        let px = 0;
        let py = 0;
        for (let m = 0; m < 2 * n; m++) [px, py] = [px + x[m] * v[m], py + y[m] * v[m]];
        let residual = 0;
        for (let m = 0; m < 2 * n; m++) residual += (v[m] - px * x[m] - py * y[m]) ** 2;
        expect(Math.sqrt(residual) / norm).toBeLessThanOrEqual(1e-8);
      }
    }
  });
});

describe('real symmetric EVD (Unitary ESPRIT) against ml-matrix', () => {
  it('eigenvalues to 1e−12 of the largest, eigenvectors to 1e−9 up to sign', () => {
    const rng = new SeededRandom(7);
    const n = 12;
    const a = new Float64Array(n * n);
    for (let i = 0; i < n; i++)
      for (let k = i; k < n; k++) a[i * n + k] = a[k * n + i] = rng.normal() + (i === k ? 3 : 0);
    const ours = symmetricEigen(a, n);
    const ref = new EigenvalueDecomposition(Matrix.from1DArray(n, n, Array.from(a)), { assumeSymmetric: true });
    const values = [...ref.realEigenvalues];
    const order = values.map((_, i) => i).sort((i, j) => values[j] - values[i]);
    const scale = Math.max(...values.map(Math.abs));
    for (let j = 0; j < n; j++) {
      expect(Math.abs(ours.values[j] - values[order[j]])).toBeLessThanOrEqual(1e-12 * scale);
      const v = ref.eigenvectorMatrix.getColumn(order[j]);
      let dot = 0;
      for (let m = 0; m < n; m++) dot += v[m] * ours.vectors[m * n + j];
      const sign = Math.sign(dot);
      for (let m = 0; m < n; m++) expect(Math.abs(ours.vectors[m * n + j] - sign * v[m])).toBeLessThanOrEqual(1e-9);
    }
  });
});

describe('least-squares fits against ml-matrix solvers', () => {
  it('complex least squares (Unitary ESPRIT, source powers) equals the QR solve of the real embedding to 1e−10', () => {
    const rng = new SeededRandom(11);
    const a = randomComplex(9, 4, rng);
    const b = randomComplex(9, 2, rng);
    const ours = leastSquares(a, b);
    const ref = solve(embed(a), stack(real(b), imag(b)));
    for (let i = 0; i < 4; i++)
      for (let k = 0; k < 2; k++) {
        expect(Math.abs(ours.re[i * 2 + k] - ref.get(i, k))).toBeLessThanOrEqual(1e-10);
        expect(Math.abs(ours.im[i * 2 + k] - ref.get(4 + i, k))).toBeLessThanOrEqual(1e-10);
      }
  });

  it("the studies' log–log slope equals ml-matrix's least-squares line to 1e−12", () => {
    const x = [10, 20, 50, 100, 200, 500, 1000];
    const y = x.map((v, i) => 3 * v ** -0.5 * (1 + 0.05 * Math.sin(i * 1.7)));
    const design = new Matrix(x.map((v) => [1, Math.log(v)]));
    const coef = solve(design, Matrix.columnVector(y.map(Math.log)));
    expect(Math.abs(logLogSlope(x, y)! - coef.get(1, 0))).toBeLessThanOrEqual(1e-12);
  });
});

function real(a: ComplexMatrix): Matrix {
  return Matrix.from1DArray(a.rows, a.cols, Array.from(a.re));
}
function imag(a: ComplexMatrix): Matrix {
  return Matrix.from1DArray(a.rows, a.cols, Array.from(a.im));
}

function stack(top: Matrix, bottom: Matrix): Matrix {
  return new Matrix([...top.to2DArray(), ...bottom.to2DArray()]);
}
