/**
 * Cramér–Rao bounds on bearings for a uniform linear array.
 *
 * Conventions (docs/conventions.md §1, §5): element m = 0 … M−1 at m·d, d in wavelengths,
 * steering a_m(θ) = exp(+j·2π·d·m·sin θ), bearings in degrees from broadside.
 * The bounds are taken with respect to θ in radians; reported standard deviations
 * are converted to degrees and full covariances stay in rad² (K × K, row-major
 * Float64Array, index origin 0). Source powers p_k and the noise power σ² are
 * linear (per-element SNR_k = p_k/σ²); N is the number of snapshots.
 *
 *  - Stochastic (unconditional) CRB, Stoica & Nehorai (1990), uncorrelated sources:
 *      CRB = σ²/(2N) · {Re[(Dᴴ·P_A⊥·D) ⊙ (P·Aᴴ·R⁻¹·A·P)ᵀ]}⁻¹, R = A·P·Aᴴ + σ²·I.
 *  - Deterministic (conditional) CRB, Stoica & Nehorai (1989), with the sample
 *    source covariance taken equal to P:
 *      CRB = σ²/(2N) · {Re[(Dᴴ·P_A⊥·D) ⊙ Pᵀ]}⁻¹.
 * Everything is reduced to K × K algebra: with G = AᴴA, Dᴴ·P_A⊥·D = DᴴD − DᴴA·G⁻¹·AᴴD
 * and AᴴR⁻¹A = G·(P·G + σ²·I)⁻¹ (because R·A·(PG + σ²I)⁻¹ = A), so the cost is
 * O(M·K² + K³) and no M × M matrix is formed.
 *
 */
import { DoaInputError, DoaNumericalError } from '../errors';
import { zeros, solve, inverse, multiply, type ComplexMatrix } from '../linalg/complex';
import { invertReal } from '../linalg/real-inverse';
import {
  requireElementCount,
  requireSpacing,
  requireFiniteArray,
  requirePositive,
  requirePositiveInteger,
  requireFiniteEntries,
} from '../checks';
import { RAD_PER_DEG } from '../angles';

export type BoundKind = 'stochastic' | 'deterministic';

export interface BoundsInput {
  elements: number;
  spacingWavelengths: number;
  /** Source bearings in degrees, strictly inside (−90, 90). */
  bearingsDeg: ArrayLike<number>;
  /** Linear source powers p_k > 0, one per bearing. */
  sourcePowers: ArrayLike<number>;
  /** Linear noise power σ² > 0. */
  noisePower: number;
  /** Number of snapshots N ≥ 1. */
  snapshots: number;
  /**
   * The elements that receive, 0-based indices on the line of `elements`, strictly ascending
   * (a line with disabled elements, docs/conventions.md §9: element m at m·d). Default: all.
   */
  elementIndices?: ArrayLike<number>;
}

export interface CrbResult {
  /** √diag(CRB) in degrees, one per source (input order). */
  stdDeg: Float64Array;
  /** The full bound, K × K row-major, rad². */
  covarianceRad2: Float64Array;
  sources: number;
}

/** Checked bound input: bearings in radians. */
export interface Checked {
  m: number;
  d: number;
  theta: Float64Array; // radians
  powers: Float64Array;
  /** Full K × K source covariance P (Hermitian, PSD); when absent P = diag(powers). */
  sourceCovariance?: ComplexMatrix;
  noise: number;
  n: number;
  /** Element positions in units of d (the enabled elements); absent: 0 … m−1. */
  positions?: Float64Array;
}

export function checkBoundsInput(input: BoundsInput): Checked {
  if (input === null || typeof input !== 'object')
    throw new DoaInputError('bad-option', 'the bound needs an input object');
  const m = requireElementCount(input.elements);
  const d = requireSpacing(input.spacingWavelengths);
  const bearings = requireFiniteArray(input.bearingsDeg, 'bearingsDeg');
  const k = bearings.length;
  if (k < 1) throw new DoaInputError('bad-source-count', 'bearingsDeg must hold at least one bearing');
  let positions: Float64Array | undefined;
  if (input.elementIndices !== undefined) {
    positions = requireFiniteArray(input.elementIndices, 'elementIndices');
    for (let i = 0; i < positions.length; i++) {
      const v = positions[i];
      if (!Number.isInteger(v) || v < 0 || v >= m || (i > 0 && v <= positions[i - 1]))
        throw new DoaInputError(
          'bad-option',
          `elementIndices[${i}] = ${v} must be an element index from 0 to ${m - 1}, strictly ascending`,
        );
    }
    if (positions.length < 2)
      throw new DoaInputError(
        'too-few-elements',
        `elementIndices keeps ${positions.length} element(s); at least 2 are needed`,
      );
    if (positions.length === m) positions = undefined;
  }
  const receiving = positions ? positions.length : m;
  if (k >= receiving)
    throw new DoaInputError(
      'bad-source-count',
      `bearingsDeg has ${k} sources; the bound needs fewer sources than elements (${receiving}${positions ? ' enabled' : ''})`,
    );
  const powers = requireFiniteArray(input.sourcePowers, 'sourcePowers', k);
  for (let i = 0; i < k; i++)
    if (!(powers[i] > 0))
      throw new DoaInputError('bad-value', `sourcePowers[${i}] must be greater than 0, got ${powers[i]}`);
  const noise = requirePositive(input.noisePower, 'noisePower');
  const n = requirePositiveInteger(input.snapshots, 'snapshots');
  const theta = new Float64Array(k);
  for (let i = 0; i < k; i++) {
    const b = bearings[i];
    if (b <= -90 || b >= 90) {
      throw new DoaInputError(
        'bad-value',
        `bearingsDeg[${i}] = ${b} must lie strictly inside (−90, 90); at endfire the bound is unbounded`,
      );
    }
    theta[i] = b * RAD_PER_DEG;
  }
  // Coincident or aliased sources make A rank-deficient.
  for (let i = 0; i < k; i++) {
    for (let j = i + 1; j < k; j++) {
      const dpsi = 2 * Math.PI * d * (Math.sin(theta[i]) - Math.sin(theta[j]));
      const wrapped = Math.abs(dpsi - 2 * Math.PI * Math.round(dpsi / (2 * Math.PI)));
      if (wrapped < 1e-9) {
        throw new DoaInputError(
          'bad-value',
          `bearingsDeg[${i}] and bearingsDeg[${j}] have the same electrical angle (coincident${d > 0.5 ? ' or grating-lobe aliases' : ''}); the bound is unbounded`,
        );
      }
    }
  }
  return { m, d, theta, powers, noise, n, ...(positions ? { positions } : {}) };
}

/**
 * Gram products of the ULA steering matrix A (M elements, spacing d wavelengths, bearings θ in
 * radians) and its θ-derivative D: G = AᴴA, AᴴD and DᴴD, each K × K. Shared by the narrowband
 * bounds here and the per-bin wideband bound (lib/doa/wideband/crb.ts).
 */
export function ulaGramProducts(
  elements: number,
  spacingWavelengths: number,
  thetaRad: ArrayLike<number>,
  /** Positions in units of d of the receiving elements (a line with gaps); default 0 … elements−1. */
  positions?: ArrayLike<number>,
): { g: ComplexMatrix; ad: ComplexMatrix; dd: ComplexMatrix } {
  const k = thetaRad.length;
  const g = zeros(k, k);
  const ad = zeros(k, k);
  const dd = zeros(k, k);
  const kk = 2 * Math.PI * spacingWavelengths;
  const s = Float64Array.from(thetaRad, Math.sin);
  const cs = Float64Array.from(thetaRad, Math.cos);
  // a_mk = e^{jmφ_k}, φ_k = kk·sinθ_k; D_mk = j·kk·cosθ_k·m·a_mk.
  // conj(a_mi)·a_mj = e^{jmΔ}, Δ = φ_j − φ_i, so every product is a weighted sum
  // of e^{jmΔ} with weights 1, m, m².
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) {
      const delta = kk * (s[j] - s[i]);
      let s0r = 0;
      let s0i = 0;
      let s1r = 0;
      let s1i = 0;
      let s2r = 0;
      let s2i = 0;
      const count = positions ? positions.length : elements;
      for (let e = 0; e < count; e++) {
        const m = positions ? positions[e] : e;
        const cr = Math.cos(m * delta);
        const ci = Math.sin(m * delta);
        s0r += cr;
        s0i += ci;
        s1r += m * cr;
        s1i += m * ci;
        s2r += m * m * cr;
        s2i += m * m * ci;
      }
      const idx = i * k + j;
      g.re[idx] = s0r;
      g.im[idx] = s0i;
      // (AᴴD)_ij = Σ conj(a_mi)·j·kk·cosθ_j·m·a_mj = j·kk·cosθ_j·S1
      const fj = kk * cs[j];
      ad.re[idx] = -fj * s1i;
      ad.im[idx] = fj * s1r;
      // (DᴴD)_ij = kk²·cosθ_i·cosθ_j·S2 (the j and −j cancel)
      const fij = kk * kk * cs[i] * cs[j];
      dd.re[idx] = fij * s2r;
      dd.im[idx] = fij * s2i;
    }
  }
  return { g, ad, dd };
}

export function crbFromChecked(c: Checked, kind: BoundKind): CrbResult {
  const k = c.theta.length;
  const { g, ad, dd } = ulaGramProducts(c.m, c.d, c.theta, c.positions);
  // H = DᴴD − (AᴴD)ᴴ·G⁻¹·AᴴD
  const gInvAd = solve(g, ad);
  const h = zeros(k, k);
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) {
      let sr = 0;
      let si = 0;
      for (let l = 0; l < k; l++) {
        // conj(ad[l,i]) · gInvAd[l,j]
        const ar = ad.re[l * k + i];
        const ai = -ad.im[l * k + i];
        const br = gInvAd.re[l * k + j];
        const bi = gInvAd.im[l * k + j];
        sr += ar * br - ai * bi;
        si += ar * bi + ai * br;
      }
      h.re[i * k + j] = dd.re[i * k + j] - sr;
      h.im[i * k + j] = dd.im[i * k + j] - si;
    }
  }
  // B = P·AᴴR⁻¹A·P (stochastic) or P (deterministic).
  const b = zeros(k, k);
  const pFull = c.sourceCovariance;
  if (pFull) {
    // Full P: B = P·G·(P·G + σ²I)⁻¹·P (stochastic) or P (deterministic).
    if (kind === 'stochastic') {
      const pg = multiply(pFull, g);
      for (let i = 0; i < k; i++) pg.re[i * k + i] += c.noise;
      const arA = multiply(g, inverse(pg));
      const full = multiply(multiply(pFull, arA), pFull);
      b.re.set(full.re);
      b.im.set(full.im);
    } else {
      b.re.set(pFull.re);
      b.im.set(pFull.im);
    }
  } else if (kind === 'stochastic') {
    const pgPlus = zeros(k, k);
    for (let i = 0; i < k; i++) {
      for (let j = 0; j < k; j++) {
        pgPlus.re[i * k + j] = c.powers[i] * g.re[i * k + j] + (i === j ? c.noise : 0);
        pgPlus.im[i * k + j] = c.powers[i] * g.im[i * k + j];
      }
    }
    const arA = multiply(g, inverse(pgPlus));
    for (let i = 0; i < k; i++) {
      for (let j = 0; j < k; j++) {
        b.re[i * k + j] = c.powers[i] * arA.re[i * k + j] * c.powers[j];
        b.im[i * k + j] = c.powers[i] * arA.im[i * k + j] * c.powers[j];
      }
    }
  } else {
    for (let i = 0; i < k; i++) b.re[i * k + i] = c.powers[i];
  }
  // Fisher = (2N/σ²)·Re[H ⊙ Bᵀ]
  const fisher = new Float64Array(k * k);
  const factor = (2 * c.n) / c.noise;
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) {
      const hr = h.re[i * k + j];
      const hi = h.im[i * k + j];
      const br = b.re[j * k + i];
      const bi = b.im[j * k + i];
      fisher[i * k + j] = factor * (hr * br - hi * bi);
    }
  }
  // Symmetrise against rounding before inverting.
  for (let i = 0; i < k; i++) {
    for (let j = i + 1; j < k; j++) {
      const v = 0.5 * (fisher[i * k + j] + fisher[j * k + i]);
      fisher[i * k + j] = v;
      fisher[j * k + i] = v;
    }
  }
  const cov = invertReal(fisher, k);
  const stdDeg = new Float64Array(k);
  for (let i = 0; i < k; i++) {
    const v = cov[i * k + i];
    if (!(v > 0))
      throw new DoaNumericalError(
        'singular-matrix',
        `the bound for source ${i} is not positive (${v}); the sources are too close to separate numerically`,
      );
    stdDeg[i] = Math.sqrt(v) / RAD_PER_DEG;
  }
  return { stdDeg, covarianceRad2: cov, sources: k };
}

/** Stochastic CRB (Stoica & Nehorai 1990) for K uncorrelated sources (docs/conventions.md §5). */
export function stochasticCrb(input: BoundsInput): CrbResult {
  return crbFromChecked(checkBoundsInput(input), 'stochastic');
}

/** Deterministic CRB (Stoica & Nehorai 1989) with the sample source covariance equal to diag(sourcePowers). */
export function deterministicCrb(input: BoundsInput): CrbResult {
  return crbFromChecked(checkBoundsInput(input), 'deterministic');
}

/** Either bound by name (default stochastic). */
export function cramerRaoBound(input: BoundsInput, kind: BoundKind = 'stochastic'): CrbResult {
  return crbFromChecked(checkBoundsInput(input), requireBoundKind(kind));
}

export interface FullCovarianceBoundsInput {
  elements: number;
  spacingWavelengths: number;
  /** Source bearings in degrees, strictly inside (−90, 90). */
  bearingsDeg: ArrayLike<number>;
  /**
   * Source covariance P = E[s·sᴴ], K × K Hermitian positive semi-definite, linear power units;
   * correlated (|P_ij| > 0) or coherent (|P_ij| = √(P_ii·P_jj)) sources allowed.
   */
  sourceCovariance: ComplexMatrix;
  /** Linear noise power σ² > 0. */
  noisePower: number;
  /** Number of snapshots N ≥ 1. */
  snapshots: number;
  /** As BoundsInput.elementIndices: the receiving elements on the line; default all. */
  elementIndices?: ArrayLike<number>;
}

/** Relative tolerance of the Hermitian and positive-semi-definite checks on P. */
const COVARIANCE_CHECK_TOLERANCE = 1e-9;

/**
 * Checks a source covariance: K × K, finite, Hermitian and with no eigen-direction clearly
 * negative (2 × 2 principal minors ≥ −tol and positive diagonal, enough for the bound to exist).
 */
function checkSourceCovariance(p: ComplexMatrix, k: number): ComplexMatrix {
  if (p === null || typeof p !== 'object' || !(p.re instanceof Float64Array) || !(p.im instanceof Float64Array))
    throw new DoaInputError('bad-option', 'sourceCovariance must be a complex matrix {rows, cols, re, im}');
  if (p.rows !== k || p.cols !== k || p.re.length !== k * k || p.im.length !== k * k)
    throw new DoaInputError(
      'bad-size',
      `sourceCovariance is ${p.rows} × ${p.cols}; expected ${k} × ${k} (one row per bearing)`,
    );
  requireFiniteEntries(p.re, 'sourceCovariance (real part)');
  requireFiniteEntries(p.im, 'sourceCovariance (imaginary part)');
  let scale = 0;
  for (let i = 0; i < k; i++) scale = Math.max(scale, Math.abs(p.re[i * k + i]));
  const tol = COVARIANCE_CHECK_TOLERANCE * scale;
  for (let i = 0; i < k; i++) {
    if (!(p.re[i * k + i] > 0) || Math.abs(p.im[i * k + i]) > tol)
      throw new DoaInputError('bad-value', `sourceCovariance[${i}][${i}] must be a real power greater than 0`);
    for (let j = i + 1; j < k; j++) {
      const dr = p.re[i * k + j] - p.re[j * k + i];
      const di = p.im[i * k + j] + p.im[j * k + i];
      if (Math.hypot(dr, di) > tol)
        throw new DoaInputError('bad-value', `sourceCovariance is not Hermitian at [${i}][${j}] and [${j}][${i}]`);
      const minor = p.re[i * k + i] * p.re[j * k + j] - (p.re[i * k + j] ** 2 + p.im[i * k + j] ** 2);
      if (minor < -tol * scale)
        throw new DoaInputError(
          'bad-value',
          `sourceCovariance is not positive semi-definite: |P[${i}][${j}]|² exceeds P[${i}][${i}]·P[${j}][${j}]`,
        );
    }
  }
  return p;
}

/**
 * Stochastic (unconditional) CRB with a FULL source covariance P, for correlated or coherent
 * sources: Stoica & Nehorai (1990), "Performance study of conditional and unconditional
 * direction-of-arrival estimation", IEEE Trans. ASSP 38(10):1783–1795, the unconditional CRB
 *   CRB = σ²/(2N) · {Re[(Dᴴ·P_A⊥·D) ⊙ (P·Aᴴ·R⁻¹·A·P)ᵀ]}⁻¹,  R = A·P·Aᴴ + σ²·I,
 * with P the full source covariance (the paper's general form; P need not be diagonal). It is
 * derived there for a non-singular P; Stoica, Larsson & Gershman (2001), IEEE SP Letters
 * 8(5):148–150, show the same expression also holds for singular P, i.e. coherent sources
 * [from memory]. Reduced to K × K algebra as above:
 * AᴴR⁻¹A = G·(P·G + σ²I)⁻¹. With a diagonal P it equals `stochasticCrb` (tested).
 */
export function stochasticCrbFullCovariance(input: FullCovarianceBoundsInput): CrbResult {
  if (input === null || typeof input !== 'object')
    throw new DoaInputError('bad-option', 'the bound needs an input object');
  const p = input.sourceCovariance;
  const k = input.bearingsDeg?.length ?? 0;
  const checkedP = checkSourceCovariance(p, k);
  const powers = new Float64Array(k);
  for (let i = 0; i < k; i++) powers[i] = checkedP.re[i * k + i];
  const c = checkBoundsInput({ ...input, sourcePowers: powers });
  return crbFromChecked({ ...c, sourceCovariance: checkedP }, 'stochastic');
}

/** Throws unless `kind` names a bound. */
export function requireBoundKind(kind: unknown): BoundKind {
  if (kind !== 'stochastic' && kind !== 'deterministic')
    throw new DoaInputError('bad-option', `bound must be 'stochastic' or 'deterministic', got ${String(kind)}`);
  return kind;
}
