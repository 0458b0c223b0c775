// Complex linear algebra against numpy/LAPACK reference fixtures written by
// fixtures/doa/generate.py (seeded), plus invariants and bad input.
import { describe, expect, it } from 'vitest';
import fixtures from '@/fixtures/doa/linalg.json';
import {
  ComplexMatrix,
  conjugateTranspose,
  transpose,
  multiply,
  subtract,
  frobeniusNorm,
  identity,
  clone,
  fromNested,
} from '@/lib/doa/linalg/complex';
import { hermitianEigen } from '@/lib/doa/linalg/hermitian-eigen';
import { symmetricEigen } from '@/lib/doa/linalg/symmetric-eigen';
import { svd } from '@/lib/doa/linalg/svd';
import { leastSquares, pseudoInverse } from '@/lib/doa/linalg/pseudo-inverse';
import { generalEigenvalues, realGeneralEigenvalues } from '@/lib/doa/linalg/general-eigen';
import { polynomialRoots, ABERTH_MIN_DEGREE } from '@/lib/doa/linalg/polynomial-roots';
import { pairReciprocalRoots } from '@/lib/doa/methods/root-music';
import { DoaInputError } from '@/lib/doa/errors';
import { matrixFromJson, maxAbsDiff, setDistance, vectorFromJson, JsonMatrix, JsonVector } from './helpers';

const fx = fixtures as unknown as {
  hermitian: { a: JsonMatrix; values: number[]; vectors: JsonMatrix; repeated: boolean }[];
  symmetric: { n: number; a: number[]; values: number[]; vectors: number[] }[];
  svd: { a: JsonMatrix; s: number[]; pinv: JsonMatrix; rank: number }[];
  lstsq: { a: JsonMatrix; b: JsonMatrix; x: JsonMatrix }[];
  eig: { a: JsonMatrix; values: JsonVector }[];
  roots: { coefficients: JsonVector; roots: JsonVector; clustered: boolean }[];
};

function diag(values: ArrayLike<number>): ComplexMatrix {
  const n = values.length;
  const d = identity(n);
  for (let i = 0; i < n; i++) d.re[i * n + i] = values[i];
  return d;
}

describe('transpose', () => {
  it('moves entry (i, k) to (k, i) without conjugating; twice gives the matrix back', () => {
    const a = {
      rows: 2,
      cols: 3,
      re: Float64Array.from([1, 2, 3, 4, 5, 6]),
      im: Float64Array.from([-1, 0, 1, 2, -2, 3]),
    };
    const t = transpose(a);
    expect([t.rows, t.cols]).toEqual([3, 2]);
    expect(Array.from(t.re)).toEqual([1, 4, 2, 5, 3, 6]);
    expect(Array.from(t.im)).toEqual([-1, 2, 0, -2, 1, 3]);
    const back = transpose(t);
    expect(Array.from(back.re)).toEqual(Array.from(a.re));
    expect(Array.from(back.im)).toEqual(Array.from(a.im));
  });
});

describe('hermitianEigen', () => {
  for (const c of fx.hermitian) {
    const n = c.a.rows;
    it(`matches numpy.linalg.eigh (LAPACK) for n = ${n}${c.repeated ? ' with repeated eigenvalues' : ''}`, () => {
      const a = matrixFromJson(c.a);
      const before = clone(a);
      const { values, vectors } = hermitianEigen(a);
      const scale = Math.max(1, Math.abs(c.values[0]), Math.abs(c.values[n - 1]));
      // Source: numpy eigh fixture; tolerance 50·n·ε·‖A‖ absolute on eigenvalues.
      expect(maxAbsDiff(values, c.values)).toBeLessThan(50 * n * Number.EPSILON * scale);
      // Invariants: VᴴV = I and A·V = V·Λ (reconstruction), 100·n·ε relative.
      const vhv = multiply(conjugateTranspose(vectors), vectors);
      expect(frobeniusNorm(subtract(vhv, identity(n)))).toBeLessThan(100 * n * Number.EPSILON);
      const recon = multiply(multiply(vectors, diag(values)), conjugateTranspose(vectors));
      expect(frobeniusNorm(subtract(recon, a))).toBeLessThan(100 * n * Number.EPSILON * scale);
      if (!c.repeated) {
        // Distinct eigenvalues: each vector equals numpy's up to a unit phase, |v_refᴴ·v| = 1.
        const ref = matrixFromJson(c.vectors);
        const overlap = multiply(conjugateTranspose(ref), vectors);
        for (let j = 0; j < n; j++) expect(Math.hypot(overlap.re[j * n + j], overlap.im[j * n + j])).toBeCloseTo(1, 9);
      }
      expect(a).toEqual(before); // no mutation
    });
  }

  it('returns eigenvalues only when asked, identical to the full run', () => {
    const a = matrixFromJson(fx.hermitian[5].a);
    const full = hermitianEigen(a);
    const only = hermitianEigen(a, { vectors: false });
    expect(only.vectors).toBeNull();
    expect(maxAbsDiff(only.values, full.values)).toBe(0);
  });

  it('rejects NaN and non-square input with a DoaInputError naming the problem', () => {
    const a = fromNested([
      [1, 2],
      [2, NaN],
    ]);
    expect(() => hermitianEigen(a)).toThrow(DoaInputError);
    expect(() => hermitianEigen(a)).toThrow(/not a finite number/);
    expect(() => hermitianEigen(fromNested([[1, 2, 3]]))).toThrow(/not square/);
  });

  it('handles 0 × 0 and 1 × 1', () => {
    expect(hermitianEigen(fromNested([])).values.length).toBe(0);
    expect(Array.from(hermitianEigen(fromNested([[4]])).values)).toEqual([4]);
  });
});

describe('symmetricEigen', () => {
  for (const c of fx.symmetric) {
    it(`matches numpy.linalg.eigh for a real ${c.n} × ${c.n} matrix and returns real vectors`, () => {
      const a = Float64Array.from(c.a);
      const { values, vectors } = symmetricEigen(a, c.n);
      // Source: numpy eigh fixture; 50·n·ε·max|λ|.
      expect(maxAbsDiff(values, c.values)).toBeLessThan(50 * c.n * Number.EPSILON * Math.max(1, Math.abs(c.values[0])));
      for (let j = 0; j < c.n; j++) {
        let dot = 0;
        for (let i = 0; i < c.n; i++) dot += vectors[i * c.n + j] * c.vectors[i * c.n + j];
        expect(Math.abs(dot)).toBeCloseTo(1, 9);
      }
      expect(Array.from(a)).toEqual(c.a);
    });
  }
});

describe('svd, pseudoInverse, leastSquares', () => {
  for (const c of fx.svd) {
    it(`matches numpy svd/pinv for ${c.a.rows} × ${c.a.cols} (rank ${c.rank})`, () => {
      const a = matrixFromJson(c.a);
      const { u, s, v } = svd(a);
      // Source: numpy.linalg.svd / pinv fixtures; 100·max(m,n)·ε·σ1 absolute.
      const tol = 100 * Math.max(c.a.rows, c.a.cols) * Number.EPSILON * c.s[0];
      expect(maxAbsDiff(s, c.s)).toBeLessThan(tol);
      const p = pseudoInverse(a);
      const ref = matrixFromJson(c.pinv);
      expect(maxAbsDiff(p.re, ref.re)).toBeLessThan(1e-12 * Math.max(1, 1 / c.s[c.rank - 1]));
      expect(maxAbsDiff(p.im, ref.im)).toBeLessThan(1e-12 * Math.max(1, 1 / c.s[c.rank - 1]));
      // Invariants: V unitary (full n × n) and A·V = U·S on the kept columns.
      const n = c.a.cols;
      expect(frobeniusNorm(subtract(multiply(conjugateTranspose(v), v), identity(n)))).toBeLessThan(
        100 * n * Number.EPSILON,
      );
      const av = multiply(a, v);
      for (let j = 0; j < s.length; j++) {
        for (let i = 0; i < c.a.rows; i++) {
          expect(Math.abs(av.re[i * n + j] - u.re[i * s.length + j] * s[j])).toBeLessThan(tol);
          expect(Math.abs(av.im[i * n + j] - u.im[i * s.length + j] * s[j])).toBeLessThan(tol);
        }
      }
    });
  }
  for (const c of fx.lstsq) {
    it(`leastSquares matches numpy.linalg.lstsq for ${c.a.rows} × ${c.a.cols}`, () => {
      const x = leastSquares(matrixFromJson(c.a), matrixFromJson(c.b));
      const ref = matrixFromJson(c.x);
      // Source: numpy lstsq fixture; 1e-12 absolute (well-conditioned random A).
      expect(maxAbsDiff(x.re, ref.re)).toBeLessThan(1e-12);
      expect(maxAbsDiff(x.im, ref.im)).toBeLessThan(1e-12);
    });
  }
  it('rejects mismatched sizes', () => {
    expect(() => leastSquares(fromNested([[1], [2]]), fromNested([[1]]))).toThrow(/2 rows|B has 1 rows/);
  });
});

describe('generalEigenvalues', () => {
  for (const c of fx.eig) {
    it(`matches numpy.linalg.eigvals (zgeev) for n = ${c.a.rows}`, () => {
      const a = matrixFromJson(c.a);
      const before = clone(a);
      // Source: numpy eigvals fixture; 1e-12 absolute as sets (order is unspecified).
      expect(setDistance(generalEigenvalues(a), vectorFromJson(c.values))).toBeLessThan(1e-12);
      expect(a).toEqual(before);
    });
  }
  it('gives real eigenvalues for a real matrix with real spectrum (analytic: triangular)', () => {
    const v = realGeneralEigenvalues(Float64Array.from([2, 1, 0, 0, -3, 5, 0, 0, 0.5]), 3);
    expect(setDistance(v, { re: Float64Array.from([2, -3, 0.5]), im: new Float64Array(3) })).toBeLessThan(1e-14);
  });
});

describe('polynomialRoots', () => {
  for (const c of fx.roots) {
    it(`matches numpy.roots for degree ${c.coefficients.re.length - 1}${c.clustered ? ' (root-MUSIC near-pairs)' : ''}`, () => {
      const coeffs = vectorFromJson(c.coefficients);
      const roots = polynomialRoots(coeffs);
      let scale = 1;
      for (let i = 0; i < c.roots.re.length; i++) scale = Math.max(scale, Math.hypot(c.roots.re[i], c.roots.im[i]));
      // Source: numpy.roots fixture; 1e-10·max(1, max|z|) absolute as sets.
      expect(roots.re.length).toBe(c.roots.re.length);
      expect(setDistance(roots, vectorFromJson(c.roots))).toBeLessThan(1e-10 * scale);
    });
  }
  for (const c of fx.roots) {
    const degree = c.coefficients.re.length - 1;
    it(`Aberth–Ehrlich (forced) matches numpy.roots for degree ${degree}${c.clustered ? ' (root-MUSIC near-pairs)' : ''}`, () => {
      const roots = polynomialRoots(vectorFromJson(c.coefficients), { method: 'aberth' });
      let scale = 1;
      for (let i = 0; i < c.roots.re.length; i++) scale = Math.max(scale, Math.hypot(c.roots.re[i], c.roots.im[i]));
      expect(roots.re.length).toBe(c.roots.re.length);
      // Source: numpy.roots fixture; same 1e-10·max(1, max|z|) as the companion path.
      expect(setDistance(roots, vectorFromJson(c.roots))).toBeLessThan(1e-10 * scale);
      if (c.clustered) {
        // The pair arguments (what root-MUSIC uses) agree to 1e-10 rad with numpy's roots paired the same way.
        const ours = pairReciprocalRoots(roots.re, roots.im)
          .map((p) => p.mu)
          .sort((a, b) => a - b);
        const ref = pairReciprocalRoots(c.roots.re, c.roots.im)
          .map((p) => p.mu)
          .sort((a, b) => a - b);
        expect(maxAbsDiff(ours, ref)).toBeLessThan(1e-10);
      }
    });
  }
  it(`uses Aberth–Ehrlich from degree ${ABERTH_MIN_DEGREE} on (auto) and the companion matrix below (consistency check)`, () => {
    const big = fx.roots.find((c) => c.coefficients.re.length - 1 >= ABERTH_MIN_DEGREE)!;
    const auto = polynomialRoots(vectorFromJson(big.coefficients));
    const forced = polynomialRoots(vectorFromJson(big.coefficients), { method: 'aberth' });
    expect(Array.from(auto.re)).toEqual(Array.from(forced.re));
  });
  it('strips leading zeros and returns exact zero roots for trailing zeros (numpy.roots behaviour)', () => {
    // (z − 2)·z² written with a leading zero: 0·z⁴ + z³ − 2z² + 0z + 0
    const r = polynomialRoots({ re: Float64Array.from([0, 1, -2, 0, 0]), im: new Float64Array(5) });
    expect(setDistance(r, { re: Float64Array.from([2, 0, 0]), im: new Float64Array(3) })).toBeLessThan(1e-14);
  });
  it('rejects Inf coefficients', () => {
    expect(() => polynomialRoots({ re: Float64Array.from([1, Infinity]), im: new Float64Array(2) })).toThrow(
      /not a finite number/,
    );
  });
});
