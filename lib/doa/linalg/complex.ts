/**
 * Dense complex matrices on typed arrays.
 *
 * Layout: split storage, `re` and `im` are separate Float64Arrays of length
 * rows·cols in row-major order, so entry (i, k) lives at index i·cols + k.
 * Indices start at 0. Nothing in this module mutates its inputs unless the
 * function name ends in `InPlace`.
 *
 * This file holds the small shared kernel (construction, products, solves).
 * Decompositions live in their own files (one per file).
 */
import { DoaInputError, DoaNumericalError } from '../errors';
import { requireSameSize, requireSquare } from '../checks';

export interface ComplexMatrix {
  readonly rows: number;
  readonly cols: number;
  readonly re: Float64Array;
  readonly im: Float64Array;
}

/** A complex vector in split layout. */
export interface ComplexVector {
  readonly re: Float64Array;
  readonly im: Float64Array;
}

export function zeros(rows: number, cols: number): ComplexMatrix {
  if (!Number.isInteger(rows) || !Number.isInteger(cols) || rows < 0 || cols < 0) {
    throw new DoaInputError('bad-size', `matrix size ${rows} × ${cols} is not a pair of non-negative integers`);
  }
  return { rows, cols, re: new Float64Array(rows * cols), im: new Float64Array(rows * cols) };
}

export function identity(n: number): ComplexMatrix {
  const out = zeros(n, n);
  for (let i = 0; i < n; i++) out.re[i * n + i] = 1;
  return out;
}

/** Builds a matrix from nested arrays (test and I/O convenience, not for hot paths). */
export function fromNested(re: ArrayLike<ArrayLike<number>>, im?: ArrayLike<ArrayLike<number>>): ComplexMatrix {
  const rows = re.length;
  const cols = rows > 0 ? re[0].length : 0;
  const out = zeros(rows, cols);
  for (let i = 0; i < rows; i++) {
    if (re[i].length !== cols || (im && im[i].length !== cols)) {
      throw new DoaInputError('bad-size', `row ${i} has ${re[i].length} entries, expected ${cols}`);
    }
    for (let k = 0; k < cols; k++) {
      out.re[i * cols + k] = re[i][k];
      if (im) out.im[i * cols + k] = im[i][k];
    }
  }
  return out;
}

export function toNested(a: ComplexMatrix): { re: number[][]; im: number[][] } {
  const re: number[][] = [];
  const im: number[][] = [];
  for (let i = 0; i < a.rows; i++) {
    re.push(Array.from(a.re.subarray(i * a.cols, (i + 1) * a.cols)));
    im.push(Array.from(a.im.subarray(i * a.cols, (i + 1) * a.cols)));
  }
  return { re, im };
}

export function clone(a: ComplexMatrix): ComplexMatrix {
  return { rows: a.rows, cols: a.cols, re: a.re.slice(), im: a.im.slice() };
}

/** Plain transpose Aᵀ (no conjugate): from element-major M × N snapshots to file layout N × M and back. */
export function transpose(a: ComplexMatrix): ComplexMatrix {
  const out = zeros(a.cols, a.rows);
  for (let i = 0; i < a.rows; i++) {
    for (let k = 0; k < a.cols; k++) {
      out.re[k * a.rows + i] = a.re[i * a.cols + k];
      out.im[k * a.rows + i] = a.im[i * a.cols + k];
    }
  }
  return out;
}

/** Conjugate (Hermitian) transpose Aᴴ. */
export function conjugateTranspose(a: ComplexMatrix): ComplexMatrix {
  const out = zeros(a.cols, a.rows);
  for (let i = 0; i < a.rows; i++) {
    for (let k = 0; k < a.cols; k++) {
      out.re[k * a.rows + i] = a.re[i * a.cols + k];
      out.im[k * a.rows + i] = -a.im[i * a.cols + k];
    }
  }
  return out;
}

/** Plain product A·B. */
export function multiply(a: ComplexMatrix, b: ComplexMatrix): ComplexMatrix {
  if (a.cols !== b.rows) {
    throw new DoaInputError('bad-size', `cannot multiply ${a.rows} × ${a.cols} by ${b.rows} × ${b.cols}`);
  }
  const n = a.rows;
  const m = a.cols;
  const p = b.cols;
  const out = zeros(n, p);
  const ore = out.re;
  const oim = out.im;
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < m; k++) {
      const ar = a.re[i * m + k];
      const ai = a.im[i * m + k];
      if (ar === 0 && ai === 0) continue;
      const rowB = k * p;
      const rowO = i * p;
      for (let j = 0; j < p; j++) {
        const br = b.re[rowB + j];
        const bi = b.im[rowB + j];
        ore[rowO + j] += ar * br - ai * bi;
        oim[rowO + j] += ar * bi + ai * br;
      }
    }
  }
  return out;
}

/** Aᴴ·B without forming Aᴴ. */
export function multiplyConjugateTransposeLeft(a: ComplexMatrix, b: ComplexMatrix): ComplexMatrix {
  if (a.rows !== b.rows) {
    throw new DoaInputError('bad-size', `cannot form Aᴴ·B with A ${a.rows} × ${a.cols} and B ${b.rows} × ${b.cols}`);
  }
  const n = a.cols;
  const p = b.cols;
  const out = zeros(n, p);
  for (let k = 0; k < a.rows; k++) {
    for (let i = 0; i < n; i++) {
      const ar = a.re[k * a.cols + i];
      const ai = -a.im[k * a.cols + i];
      if (ar === 0 && ai === 0) continue;
      for (let j = 0; j < p; j++) {
        const br = b.re[k * p + j];
        const bi = b.im[k * p + j];
        out.re[i * p + j] += ar * br - ai * bi;
        out.im[i * p + j] += ar * bi + ai * br;
      }
    }
  }
  return out;
}

export function add(a: ComplexMatrix, b: ComplexMatrix): ComplexMatrix {
  requireSameSize(a, b, 'add');
  const out = zeros(a.rows, a.cols);
  for (let i = 0; i < a.re.length; i++) {
    out.re[i] = a.re[i] + b.re[i];
    out.im[i] = a.im[i] + b.im[i];
  }
  return out;
}

export function subtract(a: ComplexMatrix, b: ComplexMatrix): ComplexMatrix {
  requireSameSize(a, b, 'subtract');
  const out = zeros(a.rows, a.cols);
  for (let i = 0; i < a.re.length; i++) {
    out.re[i] = a.re[i] - b.re[i];
    out.im[i] = a.im[i] - b.im[i];
  }
  return out;
}

/** s·A for a complex scalar s = sr + j·si. */
export function scale(a: ComplexMatrix, sr: number, si = 0): ComplexMatrix {
  const out = zeros(a.rows, a.cols);
  for (let i = 0; i < a.re.length; i++) {
    out.re[i] = sr * a.re[i] - si * a.im[i];
    out.im[i] = sr * a.im[i] + si * a.re[i];
  }
  return out;
}

/** Rows r0…r1−1 and columns c0…c1−1 (half-open ranges), copied. */
export function subMatrix(a: ComplexMatrix, r0: number, r1: number, c0: number, c1: number): ComplexMatrix {
  if (r0 < 0 || r1 > a.rows || r0 > r1 || c0 < 0 || c1 > a.cols || c0 > c1) {
    throw new DoaInputError(
      'bad-size',
      `block [${r0}, ${r1}) × [${c0}, ${c1}) lies outside a ${a.rows} × ${a.cols} matrix`,
    );
  }
  const out = zeros(r1 - r0, c1 - c0);
  for (let i = r0; i < r1; i++) {
    for (let k = c0; k < c1; k++) {
      out.re[(i - r0) * out.cols + (k - c0)] = a.re[i * a.cols + k];
      out.im[(i - r0) * out.cols + (k - c0)] = a.im[i * a.cols + k];
    }
  }
  return out;
}

/** Makes a square matrix exactly Hermitian, (A + Aᴴ)/2, in place. */
export function hermitianizeInPlace(a: ComplexMatrix): void {
  requireSquare(a, 'hermitianize');
  const n = a.rows;
  for (let i = 0; i < n; i++) {
    a.im[i * n + i] = 0;
    for (let k = i + 1; k < n; k++) {
      const re = 0.5 * (a.re[i * n + k] + a.re[k * n + i]);
      const im = 0.5 * (a.im[i * n + k] - a.im[k * n + i]);
      a.re[i * n + k] = re;
      a.im[i * n + k] = im;
      a.re[k * n + i] = re;
      a.im[k * n + i] = -im;
    }
  }
}

/** Frobenius norm. */
export function frobeniusNorm(a: ComplexMatrix): number {
  let s = 0;
  for (let i = 0; i < a.re.length; i++) s += a.re[i] * a.re[i] + a.im[i] * a.im[i];
  return Math.sqrt(s);
}

/**
 * Solves A·X = B for square A by Gaussian elimination with partial pivoting.
 * Throws DoaNumericalError when A is singular to working precision.
 */
export function solve(a: ComplexMatrix, b: ComplexMatrix): ComplexMatrix {
  requireSquare(a, 'solve');
  if (b.rows !== a.rows) {
    throw new DoaInputError('bad-size', `solve: A is ${a.rows} × ${a.cols} but B has ${b.rows} rows`);
  }
  const n = a.rows;
  const p = b.cols;
  const are = a.re.slice();
  const aim = a.im.slice();
  const bre = b.re.slice();
  const bim = b.im.slice();
  let scaleMax = 0;
  for (let i = 0; i < are.length; i++) scaleMax = Math.max(scaleMax, Math.hypot(are[i], aim[i]));
  const tiny = scaleMax * n * Number.EPSILON;
  for (let col = 0; col < n; col++) {
    let piv = col;
    let best = -1;
    for (let r = col; r < n; r++) {
      const mag = Math.hypot(are[r * n + col], aim[r * n + col]);
      if (mag > best) {
        best = mag;
        piv = r;
      }
    }
    if (!(best > tiny))
      throw new DoaNumericalError('singular-matrix', `matrix is singular to working precision at column ${col}`);
    if (piv !== col) {
      swapRows(are, aim, n, piv, col);
      swapRows(bre, bim, p, piv, col);
    }
    const pr = are[col * n + col];
    const pi = aim[col * n + col];
    const den = pr * pr + pi * pi;
    for (let r = col + 1; r < n; r++) {
      const xr = are[r * n + col];
      const xi = aim[r * n + col];
      if (xr === 0 && xi === 0) continue;
      // factor = x / pivot
      const fr = (xr * pr + xi * pi) / den;
      const fi = (xi * pr - xr * pi) / den;
      for (let c = col; c < n; c++) {
        const ur = are[col * n + c];
        const ui = aim[col * n + c];
        are[r * n + c] -= fr * ur - fi * ui;
        aim[r * n + c] -= fr * ui + fi * ur;
      }
      for (let c = 0; c < p; c++) {
        const ur = bre[col * p + c];
        const ui = bim[col * p + c];
        bre[r * p + c] -= fr * ur - fi * ui;
        bim[r * p + c] -= fr * ui + fi * ur;
      }
    }
  }
  const out = zeros(n, p);
  for (let r = n - 1; r >= 0; r--) {
    const pr = are[r * n + r];
    const pi = aim[r * n + r];
    const den = pr * pr + pi * pi;
    for (let c = 0; c < p; c++) {
      let sr = bre[r * p + c];
      let si = bim[r * p + c];
      for (let k = r + 1; k < n; k++) {
        const ar = are[r * n + k];
        const ai = aim[r * n + k];
        const xr = out.re[k * p + c];
        const xi = out.im[k * p + c];
        sr -= ar * xr - ai * xi;
        si -= ar * xi + ai * xr;
      }
      out.re[r * p + c] = (sr * pr + si * pi) / den;
      out.im[r * p + c] = (si * pr - sr * pi) / den;
    }
  }
  return out;
}

export function inverse(a: ComplexMatrix): ComplexMatrix {
  requireSquare(a, 'inverse');
  return solve(a, identity(a.rows));
}

function swapRows(re: Float64Array, im: Float64Array, width: number, r1: number, r2: number): void {
  for (let c = 0; c < width; c++) {
    const tr = re[r1 * width + c];
    re[r1 * width + c] = re[r2 * width + c];
    re[r2 * width + c] = tr;
    const ti = im[r1 * width + c];
    im[r1 * width + c] = im[r2 * width + c];
    im[r2 * width + c] = ti;
  }
}
