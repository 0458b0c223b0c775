/**
 * Seeded snapshot simulation for a ULA (demo, studies, tests).
 *
 * Model (docs/conventions.md §1–2): x(t) = A·s(t) + n(t), A = [a(θ_1) … a(θ_K)],
 * a_m(θ) = exp(+j·2π·d·m·sin θ). Sources are zero-mean circular complex
 * Gaussian with covariance S = diag(√p)·C·diag(√p), where C is the correlation
 * matrix (unit diagonal): a common real coefficient ρ ∈ [0, 1] for every pair
 * (ρ = 1: fully coherent), or a full K × K Hermitian matrix. Noise is white
 * circular complex Gaussian with power σ² per element. Powers are linear
 * (not dB). Output: the M × N snapshot matrix (split re/im, row-major).
 *
 * PRNG: xoshiro128** (Blackman & Vigna, 2018) seeded through splitmix32 from
 * a 32-bit integer seed; uniforms on (0, 1) with 53 random bits from two
 * outputs; normals by the Box–Muller transform. Same seed, same data, on
 * every platform.
 */
import { requireFiniteEntries, requireSpacing } from '../checks';
import { ComplexMatrix, zeros } from '../linalg/complex';
import { DoaInputError } from '../errors';
import { electricalAngle } from '../angles';
import { hermitianEigen } from '../linalg/hermitian-eigen';

export interface SimulateOptions {
  elements: number;
  spacingWavelengths: number;
  bearingsDeg: number[];
  /** Linear source powers, one per bearing (default all 1). */
  powers?: number[];
  /** Noise power σ² per element (≥ 0). */
  noisePower: number;
  snapshots: number;
  /** Integer seed (default 1). */
  seed?: number;
  /** ρ for every pair (0 … 1), or a K × K Hermitian correlation matrix. Default 0 (uncorrelated). */
  correlation?: number | ComplexMatrix;
}

/** xoshiro128** with splitmix32 seeding; `next()` gives a uniform on (0, 1). */
export class SeededRandom {
  private s0: number;
  private s1: number;
  private s2: number;
  private s3: number;
  private spare: number | null = null;

  constructor(seed: number) {
    if (!Number.isInteger(seed)) throw new DoaInputError('bad-value', `seed ${seed} is not an integer`);
    let x = seed >>> 0;
    const splitmix = (): number => {
      x = (x + 0x9e3779b9) >>> 0;
      let z = x;
      z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
      z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
      return (z ^ (z >>> 16)) >>> 0;
    };
    this.s0 = splitmix();
    this.s1 = splitmix();
    this.s2 = splitmix();
    this.s3 = splitmix();
    if ((this.s0 | this.s1 | this.s2 | this.s3) === 0) this.s0 = 1;
  }

  /** Next 32-bit output of xoshiro128**. */
  nextUint32(): number {
    const result = Math.imul(rotl(Math.imul(this.s1, 5), 7), 9) >>> 0;
    const t = this.s1 << 9;
    this.s2 ^= this.s0;
    this.s3 ^= this.s1;
    this.s1 ^= this.s2;
    this.s0 ^= this.s3;
    this.s2 ^= t;
    this.s3 = rotl(this.s3, 11);
    return result;
  }

  /** Uniform on the open interval (0, 1), 53 bits. */
  next(): number {
    const hi = this.nextUint32() >>> 5; // 27 bits
    const lo = this.nextUint32() >>> 6; // 26 bits
    return (hi * 67108864 + lo + 0.5) / 9007199254740992;
  }

  /** Standard normal by Box–Muller. */
  normal(): number {
    if (this.spare !== null) {
      const s = this.spare;
      this.spare = null;
      return s;
    }
    const u = this.next();
    const v = this.next();
    const r = Math.sqrt(-2 * Math.log(u));
    this.spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  }
}

function rotl(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0;
}

export function simulateSnapshots(options: SimulateOptions): ComplexMatrix {
  const { elements: m, spacingWavelengths: d, bearingsDeg, noisePower, snapshots: n } = options;
  if (!Number.isInteger(m) || m < 2)
    throw new DoaInputError('too-few-elements', `elements ${m} must be an integer ≥ 2`);
  requireSpacing(d);
  if (!Number.isInteger(n) || n < 1) throw new DoaInputError('bad-value', `snapshots ${n} must be an integer ≥ 1`);
  if (!Array.isArray(bearingsDeg)) throw new DoaInputError('bad-value', 'bearingsDeg must be an array of degrees');
  requireFiniteEntries(bearingsDeg, 'bearingsDeg');
  for (const b of bearingsDeg)
    if (b < -90 || b > 90) throw new DoaInputError('bad-value', `bearing ${b}° lies outside −90° … 90°`);
  if (!Number.isFinite(noisePower) || noisePower < 0)
    throw new DoaInputError('bad-value', `noisePower ${noisePower} must be finite and ≥ 0`);
  const k = bearingsDeg.length;
  const powers = options.powers ?? bearingsDeg.map(() => 1);
  if (powers.length !== k) throw new DoaInputError('bad-size', `${powers.length} powers for ${k} bearings`);
  requireFiniteEntries(powers, 'powers');
  for (const p of powers) if (p < 0) throw new DoaInputError('bad-value', `source power ${p} is negative`);
  const rng = new SeededRandom(options.seed ?? 1);

  // Source factor G with G·Gᴴ = S (K × K), from the EVD so coherent (rank-deficient) S works.
  const corr = zeros(k, k);
  const c = options.correlation ?? 0;
  if (typeof c === 'number') {
    if (!(c >= 0 && c <= 1)) throw new DoaInputError('bad-value', `correlation ${c} must lie in 0 … 1`);
    for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) corr.re[i * k + j] = i === j ? 1 : c;
  } else {
    if (c.rows !== k || c.cols !== k)
      throw new DoaInputError('bad-size', `correlation matrix is ${c.rows} × ${c.cols}, expected ${k} × ${k}`);
    requireFiniteEntries(c.re, 'correlation (real part)');
    requireFiniteEntries(c.im, 'correlation (imaginary part)');
    corr.re.set(c.re);
    corr.im.set(c.im);
  }
  const s = zeros(k, k);
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) {
      const g = Math.sqrt(powers[i] * powers[j]);
      s.re[i * k + j] = g * corr.re[i * k + j];
      s.im[i * k + j] = g * corr.im[i * k + j];
    }
  }
  const factor = zeros(k, k);
  if (k > 0) {
    const e = hermitianEigen(s);
    for (let j = 0; j < k; j++) {
      if (e.values[j] < -1e-12 * Math.max(1, e.values[0])) {
        throw new DoaInputError('bad-value', 'the source correlation matrix is not positive semidefinite');
      }
      const w = Math.sqrt(Math.max(0, e.values[j]));
      for (let i = 0; i < k; i++) {
        factor.re[i * k + j] = e.vectors.re[i * k + j] * w;
        factor.im[i * k + j] = e.vectors.im[i * k + j] * w;
      }
    }
  }

  const x = zeros(m, n);
  const mus = bearingsDeg.map((b) => electricalAngle(b, d));
  const wr = new Float64Array(k);
  const wi = new Float64Array(k);
  const sr = new Float64Array(k);
  const si = new Float64Array(k);
  const noiseScale = Math.sqrt(noisePower / 2);
  for (let t = 0; t < n; t++) {
    for (let j = 0; j < k; j++) {
      wr[j] = rng.normal() * Math.SQRT1_2;
      wi[j] = rng.normal() * Math.SQRT1_2;
    }
    for (let i = 0; i < k; i++) {
      let ar = 0;
      let ai = 0;
      for (let j = 0; j < k; j++) {
        const fr = factor.re[i * k + j];
        const fi = factor.im[i * k + j];
        ar += fr * wr[j] - fi * wi[j];
        ai += fr * wi[j] + fi * wr[j];
      }
      sr[i] = ar;
      si[i] = ai;
    }
    for (let e = 0; e < m; e++) {
      let re = 0;
      let im = 0;
      for (let i = 0; i < k; i++) {
        const c0 = Math.cos(mus[i] * e);
        const s0 = Math.sin(mus[i] * e);
        re += c0 * sr[i] - s0 * si[i];
        im += c0 * si[i] + s0 * sr[i];
      }
      x.re[e * n + t] = re + noiseScale * rng.normal();
      x.im[e * n + t] = im + noiseScale * rng.normal();
    }
  }
  return x;
}
