/**
 * Wideband Cramér–Rao bound for the bearings of one block.
 *
 * Per bin f (spacing d_f wavelengths, N_f snapshots = the block's frames) the
 * stochastic Fisher information of K uncorrelated sources is (Stoica & Nehorai
 * 1990, docs/references.md §5; the inverse of the narrowband CRB of bounds.ts)
 *   F_f = (2N_f/σ_f²) · Re[(Dᴴ·P_A⊥·D) ⊙ (P_f·Aᴴ·R_f⁻¹·A·P_f)ᵀ],
 * with A, D the steering matrix and its θ-derivative (θ in radians) at d_f.
 * STFT bins of a stationary Gaussian process are asymptotically independent, so
 * the information of the block is the sum over bins; the bound is
 *   CRB = η · (Σ_f F_f)⁻¹,
 * where η ≥ 1 corrects for cells that are not independent (windowTimeFrequencyRedundancy):
 * η = 1 for a rectangular window with hop = FFT length, the case in which the
 * sum is the exact asymptotic bound. A source with zero power in a bin adds
 * nothing there; a bin where two sources share an electrical angle (aliases
 * above half a wavelength) is skipped.
 *
 * The algebra is the K × K reduction of bounds.ts: with G = AᴴA,
 * Dᴴ·P_A⊥·D = DᴴD − (AᴴD)ᴴG⁻¹AᴴD and AᴴR⁻¹A = G(PG + σ²I)⁻¹.
 */
import { DoaInputError } from '../errors';
import { inverse, multiply, solve, zeros, type ComplexMatrix } from '../linalg/complex';
import { RAD_PER_DEG } from '../angles';
import { ulaGramProducts } from '../bounds/crb';

/** Stochastic Fisher information (K × K, row-major, 1/rad²) of one bin; null when A is rank-deficient. */
export function binFisherInformation(
  elements: number,
  spacingWavelengths: number,
  thetaRad: ArrayLike<number>,
  powers: ArrayLike<number>,
  noisePower: number,
  snapshots: number,
): Float64Array | null {
  const k = thetaRad.length;
  const { g, ad, dd } = ulaGramProducts(elements, spacingWavelengths, thetaRad);
  let gInvAd: ComplexMatrix;
  let arA: ComplexMatrix;
  try {
    gInvAd = solve(g, ad);
    const pgPlus = zeros(k, k);
    for (let i = 0; i < k; i++) {
      for (let j = 0; j < k; j++) {
        pgPlus.re[i * k + j] = powers[i] * g.re[i * k + j] + (i === j ? noisePower : 0);
        pgPlus.im[i * k + j] = powers[i] * g.im[i * k + j];
      }
    }
    arA = multiply(g, inverse(pgPlus));
  } catch {
    return null;
  }
  const fisher = new Float64Array(k * k);
  const factor = (2 * snapshots) / noisePower;
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) {
      let sr = 0;
      let si = 0;
      for (let l = 0; l < k; l++) {
        const ar = ad.re[l * k + i];
        const ai = -ad.im[l * k + i];
        const br = gInvAd.re[l * k + j];
        const bi = gInvAd.im[l * k + j];
        sr += ar * br - ai * bi;
        si += ar * bi + ai * br;
      }
      const hr = dd.re[i * k + j] - sr;
      const hi = dd.im[i * k + j] - si;
      // (P·AᴴR⁻¹A·P)ᵀ at (i, j) = P_j·arA[j, i]·P_i
      const br = powers[j] * arA.re[j * k + i] * powers[i];
      const bi = powers[j] * arA.im[j * k + i] * powers[i];
      fisher[i * k + j] = factor * (hr * br - hi * bi);
    }
  }
  for (let i = 0; i < k; i++) {
    for (let j = i + 1; j < k; j++) {
      const v = 0.5 * (fisher[i * k + j] + fisher[j * k + i]);
      fisher[i * k + j] = v;
      fisher[j * k + i] = v;
    }
  }
  return fisher;
}

/**
 * Redundancy η of the time–frequency cells of a block (an approximation, stated
 * in the README): η = max(ENBW, T·L/B), with ENBW = L·Σw²/(Σw)² the equivalent
 * noise bandwidth of the window in bins (1 rectangular, 1.5 Hann, ≈ 1.36 Hamming),
 * T the frames, L the FFT length and B the block length in samples. It is 1 for a
 * rectangular window with hop = L, where the cells are independent.
 */
export function windowTimeFrequencyRedundancy(window: Float64Array, frames: number, blockSamples: number): number {
  let s1 = 0;
  let s2 = 0;
  for (let i = 0; i < window.length; i++) {
    s1 += window[i];
    s2 += window[i] * window[i];
  }
  const enbw = (window.length * s2) / (s1 * s1);
  return Math.max(enbw, (frames * window.length) / blockSamples, 1);
}

export interface WidebandCrbInput {
  elements: number;
  /** Spacing in wavelengths of each bin. */
  binSpacing: ArrayLike<number>;
  bearingsDeg: ArrayLike<number>;
  /** Source powers per bin: powers[f][k] (linear, ≥ 0). */
  powers: ArrayLike<ArrayLike<number>>;
  /** Noise power per bin (linear, > 0). */
  noisePowers: ArrayLike<number>;
  /** Snapshots (frames) per bin. */
  snapshots: number;
  /** η ≥ 1 (default 1). */
  redundancy?: number;
}

export interface WidebandCrb {
  /** √diag(CRB) in degrees; Infinity for a source no bin informs. */
  stdDeg: number[];
  /** The summed Fisher information, K × K row-major, 1/rad² (before η). */
  fisher: Float64Array;
  /** Bins that contributed. */
  binsUsed: number;
}

export function widebandCrb(input: WidebandCrbInput): WidebandCrb {
  const k = input.bearingsDeg.length;
  const nb = input.binSpacing.length;
  if (input.powers.length !== nb || input.noisePowers.length !== nb) {
    throw new DoaInputError(
      'bad-size',
      `widebandCrb: ${nb} bins but ${input.powers.length} power rows and ${input.noisePowers.length} noise powers`,
    );
  }
  const eta = input.redundancy ?? 1;
  const theta = Float64Array.from(input.bearingsDeg, (b) => b * RAD_PER_DEG);
  const total = new Float64Array(k * k);
  let binsUsed = 0;
  for (let f = 0; f < nb; f++) {
    const noise = input.noisePowers[f];
    if (!(noise > 0)) continue;
    const p = input.powers[f];
    let any = false;
    for (let i = 0; i < k; i++) if (p[i] > 0) any = true;
    if (!any) continue;
    const fi = binFisherInformation(input.elements, input.binSpacing[f], theta, p, noise, input.snapshots);
    if (!fi) continue;
    binsUsed++;
    for (let i = 0; i < k * k; i++) total[i] += fi[i];
  }
  return { stdDeg: stdFromFisher(total, k, eta), fisher: total, binsUsed };
}

/**
 * √diag(η·F⁻¹) in degrees for a summed Fisher information F (K × K, 1/rad²),
 * inverted on the sources with information; Infinity for a source without any.
 */
export function stdFromFisher(total: Float64Array, k: number, eta: number): number[] {
  const stdDeg = new Array<number>(k).fill(Infinity);
  const live: number[] = [];
  for (let i = 0; i < k; i++) if (total[i * k + i] > 0) live.push(i);
  if (live.length === 0) return stdDeg;
  const q = live.length;
  const sub = zeros(q, q);
  for (let a = 0; a < q; a++) for (let b = 0; b < q; b++) sub.re[a * q + b] = total[live[a] * k + live[b]];
  try {
    const inv = inverse(sub);
    for (let a = 0; a < q; a++) {
      const v = inv.re[a * q + a] * eta;
      if (v > 0) stdDeg[live[a]] = Math.sqrt(v) / RAD_PER_DEG;
    }
  } catch {
    // singular: the sources cannot be told apart; leave Infinity
  }
  return stdDeg;
}
