// Covariance chain of docs/conventions.md §2 against the numpy fixtures of
// fixtures/doa/generate.py and against the defining formulas.
import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import fixtures from '@/fixtures/doa/methods.json';
import { ComplexMatrix, clone, conjugateTranspose, multiply, scale, zeros } from '@/lib/doa/linalg/complex';
import {
  COVARIANCE_CHUNK,
  CovarianceAccumulator,
  covarianceChunkCount,
  covarianceChunkSums,
  covarianceFromChunkSums,
  forwardBackward,
  sampleCovariance,
  sampleCovarianceFromRows,
  singleSnapshotCovariance,
  spatialSmoothing,
} from '@/lib/doa/covariance';
import { simulateSnapshots } from '@/lib/doa/sim/simulate';
import { DoaInputError } from '@/lib/doa/errors';
import { covarianceKernelInUse, setCovarianceKernel } from '@/lib/doa/wasm/covariance-kernel';
import { matrixFromJson, maxAbsDiff, JsonMatrix } from './helpers';

const scenarios = (
  fixtures as unknown as {
    scenarios: { name: string; rows: JsonMatrix; covariance: JsonMatrix; options: Record<string, unknown> }[];
  }
).scenarios;

function transpose(a: ComplexMatrix): ComplexMatrix {
  const out = zeros(a.cols, a.rows);
  for (let i = 0; i < a.rows; i++)
    for (let k = 0; k < a.cols; k++) {
      out.re[k * a.rows + i] = a.re[i * a.cols + k];
      out.im[k * a.rows + i] = a.im[i * a.cols + k];
    }
  return out;
}

/** Direct R = X·Xᴴ/N, then (R + Rᴴ)/2 (the definition). */
function directCovariance(x: ComplexMatrix): ComplexMatrix {
  const r = scale(multiply(x, conjugateTranspose(x)), 1 / x.cols);
  const rh = conjugateTranspose(r);
  const out = zeros(r.rows, r.cols);
  for (let i = 0; i < r.re.length; i++) {
    out.re[i] = 0.5 * (r.re[i] + rh.re[i]);
    out.im[i] = 0.5 * (r.im[i] + rh.im[i]);
  }
  return out;
}

describe('sample covariance', () => {
  const x = simulateSnapshots({
    elements: 7,
    spacingWavelengths: 0.5,
    bearingsDeg: [-10, 25],
    noisePower: 0.3,
    snapshots: 1001,
    seed: 5,
  });
  const ref = directCovariance(x);

  it('equals the definition X·Xᴴ/N, made Hermitian, for odd M and a partial last block (1e-13 absolute)', () => {
    const r = sampleCovariance(x);
    expect(maxAbsDiff(r.re, ref.re)).toBeLessThan(1e-13);
    expect(maxAbsDiff(r.im, ref.im)).toBeLessThan(1e-13);
  });

  it('is exactly Hermitian with a real diagonal', () => {
    const r = sampleCovariance(x);
    const m = r.rows;
    for (let i = 0; i < m; i++) {
      expect(r.im[i * m + i]).toBe(0);
      for (let k = 0; k < m; k++) {
        expect(r.re[i * m + k]).toBe(r.re[k * m + i]);
        expect(r.im[i * m + k] + r.im[k * m + i]).toBe(0);
      }
    }
  });

  it('gives the same result streamed in uneven blocks of rows, in file layout', () => {
    const rows = transpose(x);
    const acc = new CovarianceAccumulator(7, { blockSize: 64 });
    const cut = [0, 1, 130, 131, 700, 1001];
    for (let c = 0; c + 1 < cut.length; c++) {
      const part: ComplexMatrix = {
        rows: cut[c + 1] - cut[c],
        cols: 7,
        re: rows.re.subarray(cut[c] * 7, cut[c + 1] * 7),
        im: rows.im.subarray(cut[c] * 7, cut[c + 1] * 7),
      };
      acc.addRows(part);
    }
    expect(acc.snapshotCount).toBe(1001);
    const r = acc.covariance();
    expect(maxAbsDiff(r.re, ref.re)).toBeLessThan(1e-13);
    expect(maxAbsDiff(r.im, ref.im)).toBeLessThan(1e-13);
    const fromRows = sampleCovarianceFromRows(rows);
    expect(maxAbsDiff(fromRows.re, ref.re)).toBeLessThan(1e-13);
    expect(maxAbsDiff(fromRows.im, ref.im)).toBeLessThan(1e-13);
  });

  it('does not mutate its input', () => {
    const before = clone(x);
    sampleCovariance(x);
    expect(x).toEqual(before);
  });

  it('names the row and element of a non-finite value', () => {
    const rows = transpose(x);
    const bad = clone(rows);
    bad.im[3 * 7 + 4] = NaN;
    expect(() => sampleCovarianceFromRows(bad)).toThrow(DoaInputError);
    expect(() => sampleCovarianceFromRows(bad)).toThrow(/row 3 \(0-based\), element 4/);
    expect(() => new CovarianceAccumulator(3).covariance()).toThrow(/no snapshots/);
    expect(() => new CovarianceAccumulator(3).addRows(rows)).toThrow(/7 columns but the array has 3/);
  });

  // The copies into the block buffer are plain; the check runs on each block's diagonal sums,
  // so it must still name the first bad value in reading order, in any block, in both layouts.
  it('names the first non-finite value in reading order, in any block and either layout', () => {
    const m = 5;
    const n = 3 * COVARIANCE_CHUNK + 17;
    const big = simulateSnapshots({
      elements: m,
      spacingWavelengths: 0.5,
      bearingsDeg: [10],
      noisePower: 1,
      snapshots: n,
      seed: 3,
    });
    const bigRows = transpose(big);
    const snaps = clone(big);
    snaps.re[2 * n + 2500] = Infinity; // element 2, snapshot 2500
    snaps.im[4 * n + 2400] = NaN; // element 4, snapshot 2400: earlier in time, later element
    expect(() => sampleCovariance(snaps)).toThrow(/snapshot 2500 \(0-based\), element 2: Infinity/);
    const rowsBad = clone(bigRows);
    rowsBad.re[2500 * m + 2] = -Infinity;
    rowsBad.im[2400 * m + 4] = NaN;
    expect(() => sampleCovarianceFromRows(rowsBad)).toThrow(/row 2400 \(0-based\), element 4: NaN/);
    // in the last, partial block as well
    const tail = clone(bigRows);
    tail.re[(n - 1) * m] = NaN;
    expect(() => sampleCovarianceFromRows(tail)).toThrow(new RegExp(`row ${n - 1} \\(0-based\\), element 0`));
    // the helpers reuse their buffers: after an error the next call is clean
    expect(sampleCovarianceFromRows(bigRows).re).toEqual(sampleCovariance(big).re);
  });

  it('lets finite values whose sums overflow through (no false alarm)', () => {
    const rows = { rows: 4, cols: 2, re: Float64Array.from([1e200, 1, 1e200, 1, 1, 1, 1, 1]), im: new Float64Array(8) };
    const r = sampleCovarianceFromRows(rows);
    expect(r.re[0]).toBe(Infinity);
    expect(r.re[3]).toBe(1);
  });

  it('gives each call its own answer although the helpers reuse buffers', () => {
    const other = simulateSnapshots({
      elements: 7,
      spacingWavelengths: 0.5,
      bearingsDeg: [-40],
      noisePower: 2,
      snapshots: 900,
      seed: 8,
    });
    const first = sampleCovariance(x);
    const second = sampleCovariance(other);
    expect(sampleCovariance(x)).toEqual(first);
    expect(second).toEqual(sampleCovarianceFresh(other));
  });
});

/** R from an accumulator of its own (no shared buffers). */
function sampleCovarianceFresh(a: ComplexMatrix): ComplexMatrix {
  const acc = new CovarianceAccumulator(a.rows);
  acc.addSnapshots(a);
  return acc.covariance();
}

describe('fixed summation order: chunk sums (bit for bit, whatever the split)', () => {
  // N = 2·C + 904 snapshots (C = COVARIANCE_CHUNK = 1024): chunks of C, C and 904; M = 7 (odd, padded) and 16.
  const n = 2 * COVARIANCE_CHUNK + 904;
  for (const m of [7, 16]) {
    const x = simulateSnapshots({
      elements: m,
      spacingWavelengths: 0.5,
      bearingsDeg: [-20, 15],
      noisePower: 1,
      snapshots: n,
      seed: 11,
    });
    const rows = transpose(x);
    const reference = sampleCovariance(x);

    it(`M = ${m}: the accumulator's result does not depend on how the snapshots are fed`, () => {
      const acc = new CovarianceAccumulator(m); // the default block size (blocks are part of the order)
      const c = COVARIANCE_CHUNK;
      for (const [start, end] of [
        [0, 1],
        [1, c - 1],
        [c - 1, c + 1],
        [c + 1, 2 * c + 3],
        [2 * c + 3, n - 1],
        [n - 1, n],
      ])
        acc.addRows(rows, { start, end });
      const r = acc.covariance();
      expect(r.re).toEqual(reference.re);
      expect(r.im).toEqual(reference.im);
      expect(sampleCovarianceFromRows(rows).re).toEqual(reference.re);
    });

    it(`M = ${m}: chunk sums split over 1, 2 or 3 parts combine to the sequential result exactly`, () => {
      const chunks = covarianceChunkCount(n);
      expect(chunks).toBe(3);
      expect(COVARIANCE_CHUNK).toBe(1024);
      for (const split of [[3], [1, 2], [2, 1], [1, 1, 1]]) {
        const parts: Float64Array[] = [];
        let first = 0;
        for (const count of split) {
          parts.push(
            covarianceChunkSums(split.length === 2 ? x : rows, split.length === 2 ? 'snapshots' : 'rows', first, count),
          );
          first += count;
        }
        const r = covarianceFromChunkSums(m, n, parts);
        expect(r.re).toEqual(reference.re);
        expect(r.im).toEqual(reference.im);
      }
      expect(() => covarianceFromChunkSums(m, n, [covarianceChunkSums(x, 'snapshots', 0, 2)])).toThrow(
        /2 chunk sums given, 3 needed/,
      );
    });
  }

  it('keeps the row numbers of the whole matrix in error messages', () => {
    const x = simulateSnapshots({
      elements: 3,
      spacingWavelengths: 0.5,
      bearingsDeg: [0],
      noisePower: 1,
      snapshots: 5000,
      seed: 2,
    });
    const rows = transpose(x);
    rows.re[4500 * 3 + 1] = Infinity;
    expect(() => covarianceChunkSums(rows, 'rows', Math.floor(4500 / COVARIANCE_CHUNK), 1)).toThrow(
      /row 4500 \(0-based\), element 1/,
    );
  });
});

describe('WebAssembly and JavaScript covariance kernels', () => {
  it('the committed wasm bytes are the build of lib/doa/wasm/covariance.wat (scripts/build-wasm.mjs --check)', () => {
    const res = spawnSync(process.execPath, ['scripts/build-wasm.mjs', '--check'], { encoding: 'utf8' });
    expect(res.stderr).toBe('');
    expect(res.status).toBe(0);
  });

  it('give bit for bit the same R (odd and even M and block lengths, several chunks); consistency check', () => {
    expect(covarianceKernelInUse()).toBe('wasm'); // Node 20 has WebAssembly SIMD
    for (const [m, n, blockSize] of [
      [2, 9, 256],
      [5, 3, 256],
      [7, 1001, 256],
      [16, 1000, 255],
      [33, 9001, 256],
    ]) {
      const x = simulateSnapshots({
        elements: m,
        spacingWavelengths: 0.5,
        bearingsDeg: [-20, 15],
        noisePower: 1,
        snapshots: n,
        seed: 5,
      });
      const accumulate = () => {
        const acc = new CovarianceAccumulator(m, { blockSize });
        acc.addSnapshots(x);
        return acc.covariance();
      };
      const fast = accumulate();
      setCovarianceKernel('js');
      try {
        expect(covarianceKernelInUse()).toBe('js');
        const slow = accumulate();
        expect(slow.re).toEqual(fast.re);
        expect(slow.im).toEqual(fast.im);
      } finally {
        setCovarianceKernel('auto');
      }
      // and both equal the defining sum X·Xᴴ/N to rounding
      const direct = scale(multiply(x, conjugateTranspose(x)), 1 / n);
      expect(maxAbsDiff(fast.re, direct.re)).toBeLessThan(1e-12);
      expect(maxAbsDiff(fast.im, direct.im)).toBeLessThan(1e-12);
    }
  });
});

describe('smoothing, forward–backward, single-snapshot arrangement', () => {
  const x = simulateSnapshots({
    elements: 9,
    spacingWavelengths: 0.5,
    bearingsDeg: [-30, 12],
    noisePower: 0.1,
    snapshots: 3,
    seed: 11,
  });
  const r = sampleCovariance(x);

  it('spatial smoothing is the mean of the M−L+1 diagonal blocks, real and imaginary parts (docs/conventions.md §2)', () => {
    const s = spatialSmoothing(r, 6);
    expect(s.rows).toBe(6);
    expect(s.cols).toBe(6);
    // The complex matrix entry by entry against the definition; 1e-14 absolute (entries of order 1, a few ulp).
    let imaginaryMass = 0;
    for (let i = 0; i < 6; i++)
      for (let k = 0; k < 6; k++) {
        let re = 0;
        let im = 0;
        for (let b = 0; b < 4; b++) {
          re += r.re[(b + i) * 9 + b + k];
          im += r.im[(b + i) * 9 + b + k];
        }
        expect(Math.abs(s.re[i * 6 + k] - re / 4)).toBeLessThan(1e-14);
        expect(Math.abs(s.im[i * 6 + k] - im / 4)).toBeLessThan(1e-14);
        imaginaryMass += Math.abs(im / 4);
      }
    // Two sources off broadside: the smoothed matrix is far from real, so the imaginary check bites.
    expect(imaginaryMass).toBeGreaterThan(1);
    expect(() => spatialSmoothing(r, 10)).toThrow(/from 2 to the 9 elements/);
    expect(() => spatialSmoothing(r, 1.5)).toThrow(DoaInputError);
  });

  it('forward–backward equals (R + J·conj(R)·J)/2 and is persymmetric', () => {
    const f = forwardBackward(r);
    const m = 9;
    for (let i = 0; i < m; i++)
      for (let k = 0; k < m; k++) {
        const j = (m - 1 - i) * m + (m - 1 - k);
        expect(f.re[i * m + k]).toBeCloseTo(0.5 * (r.re[i * m + k] + r.re[j]), 15);
        expect(f.im[i * m + k]).toBeCloseTo(0.5 * (r.im[i * m + k] - r.im[j]), 15);
        expect(f.re[i * m + k]).toBeCloseTo(f.re[j], 15);
        expect(f.im[i * m + k]).toBeCloseTo(-f.im[j], 15);
      }
  });

  it('single-snapshot arrangement equals the literal Hankel form H·Hᴴ/(M−L+1), averaged (docs/conventions.md §2)', () => {
    const l = 5; // default ⌊9/2⌋+1
    const literal = zeros(l, l);
    for (let t = 0; t < x.cols; t++) {
      const h = zeros(l, 9 - l + 1);
      for (let i = 0; i < l; i++)
        for (let k = 0; k < 9 - l + 1; k++) {
          h.re[i * h.cols + k] = x.re[(i + k) * x.cols + t];
          h.im[i * h.cols + k] = x.im[(i + k) * x.cols + t];
        }
      const hh = scale(multiply(h, conjugateTranspose(h)), 1 / (9 - l + 1) / x.cols);
      for (let q = 0; q < l * l; q++) {
        literal.re[q] += hh.re[q];
        literal.im[q] += hh.im[q];
      }
    }
    const fast = singleSnapshotCovariance(x);
    expect(fast.rows).toBe(5);
    expect(maxAbsDiff(fast.re, literal.re)).toBeLessThan(1e-14);
    expect(maxAbsDiff(fast.im, literal.im)).toBeLessThan(1e-14);
  });

  for (const s of scenarios) {
    it(`the whole chain matches numpy for fixture "${s.name}" (1e-13 absolute)`, () => {
      const rows = matrixFromJson(s.rows);
      const o = s.options as {
        singleSnapshot?: boolean;
        singleSnapshotSubarray?: number;
        smoothingSubarray?: number;
        forwardBackward?: boolean;
      };
      let c = sampleCovarianceFromRows(rows);
      if (o.singleSnapshot) c = spatialSmoothing(c, o.singleSnapshotSubarray ?? Math.floor(rows.cols / 2) + 1);
      if (o.smoothingSubarray) c = spatialSmoothing(c, o.smoothingSubarray);
      if (o.forwardBackward) c = forwardBackward(c);
      const ref = matrixFromJson(s.covariance);
      expect(maxAbsDiff(c.re, ref.re)).toBeLessThan(1e-13);
      expect(maxAbsDiff(c.im, ref.im)).toBeLessThan(1e-13);
    });
  }
});
