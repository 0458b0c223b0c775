/**
 * Sample covariance and the covariance arrangements of docs/conventions.md §2.
 *
 * Layouts: a snapshot matrix X is M × N (elements × snapshots) as a
 * ComplexMatrix (split re/im, row-major); file-layout "rows" are N × M (one
 * snapshot per row). Covariances are M × M ComplexMatrix, exactly Hermitian.
 * Normalisation: R = X·Xᴴ / N. Inputs are never mutated.
 *
 * Order fixed by the conventions: (single-snapshot arrangement, or sample
 * covariance) → forward spatial smoothing → forward–backward averaging.
 *
 * Speed: the accumulator copies blocks of `blockSize` snapshots into an
 * element-major buffer (each element's real parts, then its imaginary parts, contiguous;
 * M padded to even) and accumulates only the upper triangle i ≤ k in 2 × 2 tiles. The
 * block kernel (wasm/covariance-kernel.ts) is WebAssembly SIMD over pairs of snapshots,
 * with a JavaScript twin that repeats its arithmetic in the same order (bit for bit the
 * same sums). The lower triangle is the conjugate, so R is Hermitian by construction,
 * which is exactly (R + Rᴴ)/2.
 *
 * Fixed summation order, whatever the threading: the snapshots fall into chunks of
 * COVARIANCE_CHUNK (1024) consecutive snapshots; each chunk's sum starts from zero
 * (blocks never straddle a chunk boundary; inside a block each entry sums the even and the
 * odd snapshots separately and adds the two), and the chunk sums are added to the total in
 * chunk order. `covarianceChunkSums` computes the sums of a range of chunks on its own and
 * `covarianceFromChunkSums` adds them in order, so splitting the chunks over worker
 * threads (lib/jobs/pooled-covariance.ts) gives R bit for bit equal to the accumulator's.
 */
import { requireSquare } from './checks';
import { ComplexMatrix, zeros } from './linalg/complex';
import { DoaInputError } from './errors';
import { blockTileSums } from './wasm/covariance-kernel';

/** Snapshots per chunk of the fixed summation order (see the header). */
export const COVARIANCE_CHUNK = 1024;

export interface CovarianceAccumulatorOptions {
  /** Snapshots per block (default 256). */
  blockSize?: number;
}

export class CovarianceAccumulator {
  readonly elements: number;
  private readonly padded: number;
  private readonly blockSize: number;
  /** Row length of each half of an element's block buffer: blockSize rounded up to even. */
  private readonly stride: number;
  /** Block buffer, element-major: element i, snapshot t real part at 2b·i + t, imaginary part at 2b·i + b + t. */
  private readonly buf: Float64Array;
  private fill = 0;
  /** Columns of the block copied by addSnapshots and not yet checked for finite values. */
  private pending: { column: number; count: number; first: number; rows?: boolean }[] = [];
  /** Sums of the current chunk (upper triangle, padded p × p). */
  private readonly chunkRe: Float64Array;
  private readonly chunkIm: Float64Array;
  private chunkFill = 0;
  /** Completed chunks, added in order. */
  private readonly sumRe: Float64Array;
  private readonly sumIm: Float64Array;
  private total = 0;

  constructor(elements: number, options: CovarianceAccumulatorOptions = {}) {
    if (!Number.isInteger(elements) || elements < 1) {
      throw new DoaInputError('bad-size', `CovarianceAccumulator: element count ${elements} is not a positive integer`);
    }
    const blockSize = options.blockSize ?? 256;
    if (!Number.isInteger(blockSize) || blockSize < 1) {
      throw new DoaInputError('bad-option', `CovarianceAccumulator: blockSize ${blockSize} is not a positive integer`);
    }
    this.elements = elements;
    this.padded = elements + (elements % 2);
    this.blockSize = blockSize;
    this.stride = blockSize + (blockSize % 2);
    this.buf = new Float64Array(2 * this.padded * this.stride);
    this.sumRe = new Float64Array(this.padded * this.padded);
    this.sumIm = new Float64Array(this.padded * this.padded);
    this.chunkRe = new Float64Array(this.padded * this.padded);
    this.chunkIm = new Float64Array(this.padded * this.padded);
  }

  /** Empties the accumulator (buffers are kept), as if it had just been made. */
  reset(): void {
    this.fill = 0;
    this.pending = [];
    this.chunkRe.fill(0);
    this.chunkIm.fill(0);
    this.chunkFill = 0;
    this.sumRe.fill(0);
    this.sumIm.fill(0);
    this.total = 0;
  }

  /** Room left in the current block before a flush is due (block full or chunk complete). */
  private room(): number {
    return Math.min(this.blockSize - this.fill, COVARIANCE_CHUNK - this.chunkFill - this.fill);
  }

  /** Snapshots accumulated so far. */
  get snapshotCount(): number {
    return this.total + this.chunkFill + this.fill;
  }

  /**
   * Adds N_b snapshots given in file layout: an N_b × M matrix, one snapshot per row.
   * `range` limits it to rows [start, end) (error messages keep the matrix's row numbers).
   */
  addRows(rows: ComplexMatrix, range?: { start: number; end: number }): void {
    if (rows.cols !== this.elements) {
      throw new DoaInputError(
        'bad-size',
        `snapshot rows have ${rows.cols} columns but the array has ${this.elements} elements`,
      );
    }
    const m = this.elements;
    const b = this.stride;
    const re = rows.re;
    const im = rows.im;
    let start = range?.start ?? 0;
    const last = range?.end ?? rows.rows;
    while (start < last) {
      const take = Math.min(this.room(), last - start);
      const buf = this.buf;
      const col = this.fill;
      // Row by row: contiguous reads, writes 2b apart. The finite check waits for
      // the flush, as in addSnapshots.
      const b2 = 2 * b;
      for (let t = 0; t < take; t++) {
        const src = (start + t) * m;
        let dst = col + t;
        for (let i = 0; i < m; i++, dst += b2) {
          buf[dst] = re[src + i];
          buf[dst + b] = im[src + i];
        }
      }
      this.pending.push({ column: col, count: take, first: start, rows: true });
      this.fill += take;
      start += take;
      if (this.room() === 0) this.flush();
    }
  }

  /**
   * Adds the N snapshots of an M × N snapshot matrix (one snapshot per column); `range`
   * limits it to columns [start, end).
   */
  addSnapshots(x: ComplexMatrix, range?: { start: number; end: number }): void {
    if (x.rows !== this.elements) {
      throw new DoaInputError(
        'bad-size',
        `snapshot matrix has ${x.rows} rows but the array has ${this.elements} elements`,
      );
    }
    const m = this.elements;
    const n = range?.end ?? x.cols;
    const b = this.stride;
    const stride = x.cols;
    let start = range?.start ?? 0;
    while (start < n) {
      const take = Math.min(this.room(), n - start);
      // Plain copies (no per-value JavaScript, so no JIT warm-up); the finite check waits
      // for the block's diagonal sums (flush), which are non-finite exactly when a copied
      // value is (or when the sums overflow, which the scan then tells apart).
      const buf = this.buf;
      const dst0 = this.fill;
      for (let i = 0; i < m; i++) {
        const src = i * stride + start;
        const dst = 2 * i * b + dst0;
        buf.set(x.re.subarray(src, src + take), dst);
        buf.set(x.im.subarray(src, src + take), dst + b);
      }
      this.pending.push({ column: dst0, count: take, first: start });
      this.fill += take;
      start += take;
      if (this.room() === 0) this.flush();
    }
  }

  /**
   * Throws for the first non-finite value among the block's unchecked columns, segment by
   * segment in the order they were added (row by row for addRows, element by element for
   * addSnapshots), as the copy-time checks used to.
   */
  private throwIfNotFinite(): void {
    const b = this.stride;
    const buf = this.buf;
    for (const seg of this.pending) {
      if (seg.rows) {
        // file layout: the first bad value row by row, as the rows were read
        for (let t = 0; t < seg.count; t++) {
          for (let i = 0; i < this.elements; i++) {
            const xr = buf[2 * i * b + seg.column + t];
            const xi = buf[2 * i * b + b + seg.column + t];
            if (!Number.isFinite(xr) || !Number.isFinite(xi)) {
              throw new DoaInputError(
                'not-finite',
                `snapshot row ${seg.first + t} (0-based), element ${i}: ${Number.isFinite(xr) ? xi : xr} is not a finite number`,
              );
            }
          }
        }
        continue;
      }
      for (let i = 0; i < this.elements; i++) {
        const o = 2 * i * b + seg.column;
        for (let t = 0; t < seg.count; t++) {
          const xr = buf[o + t];
          const xi = buf[o + b + t];
          if (!Number.isFinite(xr) || !Number.isFinite(xi)) {
            throw new DoaInputError(
              'not-finite',
              `snapshot ${seg.first + t} (0-based), element ${i}: ${Number.isFinite(xr) ? xi : xr} is not a finite number`,
            );
          }
        }
      }
    }
  }

  /** R = X·Xᴴ / N over everything added so far (the accumulator stays usable). */
  covariance(): ComplexMatrix {
    this.flush();
    const count = this.total + this.chunkFill;
    if (count === 0) throw new DoaInputError('bad-size', 'no snapshots were given: the covariance needs at least one');
    if (this.chunkFill === 0) return normalisedCovariance(this.sumRe, this.sumIm, this.elements, count);
    // The partial last chunk is added as a complete one would be, without closing it.
    const re = this.sumRe.slice();
    const im = this.sumIm.slice();
    addInto(re, this.chunkRe);
    addInto(im, this.chunkIm);
    return normalisedCovariance(re, im, this.elements, count);
  }

  /**
   * The raw (unnormalised, padded, upper-triangle) sums of an accumulator that holds at most
   * one chunk (covarianceChunkSums gives each chunk its own accumulator). A completed chunk
   * has already been added to the (zero) total, which holds it exactly.
   */
  singleChunkSums(): { re: Float64Array; im: Float64Array } {
    this.flush();
    if (this.total > 0 && this.chunkFill > 0)
      throw new Error('singleChunkSums: the accumulator holds more than one chunk');
    return this.total > 0 ? { re: this.sumRe, im: this.sumIm } : { re: this.chunkRe, im: this.chunkIm };
  }

  private flush(): void {
    const count = this.fill;
    if (count === 0) return;
    const b = this.stride;
    const p = this.padded;
    const buf = this.buf;
    const sr = this.chunkRe;
    const si = this.chunkIm;
    const b2 = 2 * b;
    if (p !== this.elements) {
      // Zero the padding row so its products vanish.
      buf.fill(0, this.elements * b2, this.elements * b2 + b2);
    }
    // The kernel takes pairs of snapshots: an odd block gets one zero snapshot.
    let even = count;
    if (count % 2 === 1) {
      for (let i = 0; i < p; i++) {
        buf[i * b2 + count] = 0;
        buf[i * b2 + b + count] = 0;
      }
      even = count + 1;
    }
    const { sums, at } = blockTileSums(buf, p, b, even);
    const pp = p * p;
    if (this.pending.length > 0) {
      let diagonal = 0;
      for (let i = 0; i < this.elements; i++) diagonal += sums[at + i * p + i] * 0;
      if (diagonal !== 0) this.throwIfNotFinite();
      this.pending = [];
    }
    for (let i = 0; i < p; i += 2) {
      for (let k = i; k < p; k += 2) {
        const e = i * p + k;
        sr[e] += sums[at + e];
        si[e] += sums[at + pp + e];
        sr[e + 1] += sums[at + e + 1];
        si[e + 1] += sums[at + pp + e + 1];
        sr[e + p] += sums[at + e + p]; // lower entry when k = i: unused
        si[e + p] += sums[at + pp + e + p];
        sr[e + p + 1] += sums[at + e + p + 1];
        si[e + p + 1] += sums[at + pp + e + p + 1];
      }
    }
    this.chunkFill += count;
    this.fill = 0;
    if (this.chunkFill === COVARIANCE_CHUNK) {
      addInto(this.sumRe, this.chunkRe);
      addInto(this.sumIm, this.chunkIm);
      this.chunkRe.fill(0);
      this.chunkIm.fill(0);
      this.total += this.chunkFill;
      this.chunkFill = 0;
    }
  }
}

function addInto(to: Float64Array, from: Float64Array): void {
  for (let i = 0; i < to.length; i++) to[i] += from[i];
}

/** Hermitian M × M covariance from padded upper-triangle sums over `count` snapshots. */
function normalisedCovariance(sumRe: Float64Array, sumIm: Float64Array, m: number, count: number): ComplexMatrix {
  const p = m + (m % 2);
  const out = zeros(m, m);
  const inv = 1 / count;
  for (let i = 0; i < m; i++) {
    out.re[i * m + i] = sumRe[i * p + i] * inv;
    for (let k = i + 1; k < m; k++) {
      const re = sumRe[i * p + k] * inv;
      const im = sumIm[i * p + k] * inv;
      out.re[i * m + k] = re;
      out.im[i * m + k] = im;
      out.re[k * m + i] = re;
      out.im[k * m + i] = -im;
    }
  }
  return out;
}

/** Number of chunks (COVARIANCE_CHUNK snapshots each, the last possibly shorter) of N snapshots. */
export function covarianceChunkCount(snapshots: number): number {
  return Math.ceil(snapshots / COVARIANCE_CHUNK);
}

/**
 * The raw sums of chunks [firstChunk, firstChunk + chunkCount) of a snapshot matrix:
 * for each chunk, the padded p × p (p = M rounded up to even) upper-triangle sums
 * Σ x_i·conj(x_k), real parts then imaginary parts, concatenated chunk after chunk
 * (2·p² values per chunk). `layout` 'rows' is N × M (file layout), 'snapshots' M × N.
 * `into`, when given, receives them (it must hold exactly that many values; a worker thread
 * writes them straight into shared memory that way) and is returned.
 */
export function covarianceChunkSums(
  x: ComplexMatrix,
  layout: 'rows' | 'snapshots',
  firstChunk: number,
  chunkCount: number,
  into?: Float64Array,
): Float64Array {
  const m = layout === 'rows' ? x.cols : x.rows;
  const n = layout === 'rows' ? x.rows : x.cols;
  const p = m + (m % 2);
  if (into && into.length !== chunkCount * 2 * p * p) {
    throw new DoaInputError(
      'bad-size',
      `covarianceChunkSums: the output holds ${into.length} values, ${chunkCount * 2 * p * p} needed`,
    );
  }
  const out = into ?? new Float64Array(chunkCount * 2 * p * p);
  for (let c = 0; c < chunkCount; c++) {
    const start = (firstChunk + c) * COVARIANCE_CHUNK;
    const end = Math.min(n, start + COVARIANCE_CHUNK);
    if (start >= end)
      throw new DoaInputError('bad-size', `covariance chunk ${firstChunk + c} is beyond the ${n} snapshots`);
    const one = reusableAccumulator(m);
    if (layout === 'rows') one.addRows(x, { start, end });
    else one.addSnapshots(x, { start, end });
    const sums = one.singleChunkSums();
    out.set(sums.re, c * 2 * p * p);
    out.set(sums.im, c * 2 * p * p + p * p);
  }
  return out;
}

/**
 * R = X·Xᴴ/N from the chunk sums of all chunks, in chunk order (`parts` are consecutive
 * outputs of covarianceChunkSums covering chunks 0 … C−1): the additions of the
 * accumulator, so the result equals sampleCovariance bit for bit.
 */
export function covarianceFromChunkSums(elements: number, snapshots: number, parts: Float64Array[]): ComplexMatrix {
  const p = elements + (elements % 2);
  const size = 2 * p * p;
  const expected = covarianceChunkCount(snapshots);
  const got = parts.reduce((s, part) => s + part.length / size, 0);
  if (got !== expected) {
    throw new DoaInputError('bad-size', `covarianceFromChunkSums: ${got} chunk sums given, ${expected} needed`);
  }
  if (snapshots === 0)
    throw new DoaInputError('bad-size', 'no snapshots were given: the covariance needs at least one');
  const re = new Float64Array(p * p);
  const im = new Float64Array(p * p);
  for (const part of parts) {
    for (let at = 0; at < part.length; at += size) {
      for (let i = 0; i < p * p; i++) re[i] += part[at + i];
      for (let i = 0; i < p * p; i++) im[i] += part[at + p * p + i];
    }
  }
  return normalisedCovariance(re, im, elements, snapshots);
}

/** R = X·Xᴴ/N for an M × N snapshot matrix. */
export function sampleCovariance(x: ComplexMatrix): ComplexMatrix {
  const acc = reusableAccumulator(x.rows);
  acc.addSnapshots(x);
  return acc.covariance();
}

/** R = X·Xᴴ/N for file-layout rows (N × M, one snapshot per row; X is their transpose). */
export function sampleCovarianceFromRows(rows: ComplexMatrix): ComplexMatrix {
  const acc = reusableAccumulator(rows.cols);
  acc.addRows(rows);
  return acc.covariance();
}

// Accumulators kept for the synchronous helpers above, one per element count (a few
// counts at most). A fresh accumulator means fresh buffers of a few hundred kilobytes;
// allocations of that size come straight from the operating system, page faults and
// zeroing included, which doubled the time of a chunk of 64 × 1024 snapshots.
const spare = new Map<number, CovarianceAccumulator>();

function reusableAccumulator(elements: number): CovarianceAccumulator {
  let acc = spare.get(elements);
  if (acc) {
    acc.reset();
    return acc;
  }
  acc = new CovarianceAccumulator(elements);
  if (spare.size >= 4) spare.delete(spare.keys().next().value as number);
  spare.set(elements, acc);
  return acc;
}

/**
 * Forward spatial smoothing: the mean of the M−L+1 diagonal L × L blocks
 * R[i:i+L, i:i+L]. The effective array has L elements at the same spacing.
 */
export function spatialSmoothing(r: ComplexMatrix, subarray: number): ComplexMatrix {
  requireSquare(r, 'spatialSmoothing');
  const m = r.rows;
  if (!Number.isInteger(subarray) || subarray < 2 || subarray > m) {
    throw new DoaInputError(
      'bad-option',
      `smoothing subarray ${subarray} must be an integer from 2 to the ${m} elements`,
    );
  }
  const l = subarray;
  const blocks = m - l + 1;
  const out = zeros(l, l);
  for (let s = 0; s < blocks; s++) {
    for (let i = 0; i < l; i++) {
      const src = (s + i) * m + s;
      const dst = i * l;
      for (let k = 0; k < l; k++) {
        out.re[dst + k] += r.re[src + k];
        out.im[dst + k] += r.im[src + k];
      }
    }
  }
  const inv = 1 / blocks;
  for (let i = 0; i < l * l; i++) {
    out.re[i] *= inv;
    out.im[i] *= inv;
  }
  return out;
}

/** R_fb = (R + J·conj(R)·J)/2, J the exchange matrix: (J R̄ J)[i,k] = conj(R[M−1−i, M−1−k]). */
export function forwardBackward(r: ComplexMatrix): ComplexMatrix {
  requireSquare(r, 'forwardBackward');
  const m = r.rows;
  const out = zeros(m, m);
  for (let i = 0; i < m; i++) {
    for (let k = 0; k < m; k++) {
      const src = (m - 1 - i) * m + (m - 1 - k);
      out.re[i * m + k] = 0.5 * (r.re[i * m + k] + r.re[src]);
      out.im[i * m + k] = 0.5 * (r.im[i * m + k] - r.im[src]);
    }
  }
  return out;
}

/** Default single-snapshot subarray, L = ⌊M/2⌋ + 1. */
export function defaultSingleSnapshotSubarray(elements: number): number {
  return Math.floor(elements / 2) + 1;
}

/**
 * Single-snapshot arrangement (docs/conventions.md §2): for each snapshot x, the
 * Hankel matrix H[i,k] = x[i+k] (L × (M−L+1)), H·Hᴴ/(M−L+1), averaged over
 * snapshots. Entry (i, j) of H·Hᴴ/(M−L+1) is the mean over s of x[i+s]·conj(x[j+s]),
 * which is the smoothed x·xᴴ, so this computes spatialSmoothing(sampleCovariance(x), L)
 * (the identity is checked in the tests and in fixtures/doa/generate.py).
 */
export function singleSnapshotCovariance(
  x: ComplexMatrix,
  subarray = defaultSingleSnapshotSubarray(x.rows),
): ComplexMatrix {
  return spatialSmoothing(sampleCovariance(x), subarray);
}
