/**
 * Cramér–Rao bounds and resolvability for a uniform linear array.
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
 * Resolvability of a pair (i, j):
 *  - the Rayleigh gap test of docs/conventions.md §5: |sin θi − sin θj| < 1/(M·d);
 *  - a statistical resolution figure by the criterion of Smith (2005), IEEE Trans. SP
 *    53(5):1597–1609: two sources are resolvable when their separation δ = θj − θi
 *    is at least its own standard deviation, δ ≥ √CRB(δ) with
 *    CRB(δ) = C_ii + C_jj − 2·C_ij; the resolution limit is the δ solving δ = √CRB(δ).
 *    The criterion comes from the reference list (docs/references.md §8); the check values
 *    in the tests were computed from it, not quoted from the paper.
 */
import { DoaInputError, DoaNumericalError } from './errors';
import { zeros, solve, inverse, multiply, type ComplexMatrix } from './linalg/complex';
import {
  requireElementCount,
  requireSpacing,
  requireFiniteArray,
  requirePositive,
  requirePositiveInteger,
  requireBearing,
  requireFinite,
  DEG,
} from './design/figures-checks';
import { rayleighGap } from './design/array-figures';

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
}

export interface CrbResult {
  /** √diag(CRB) in degrees, one per source (input order). */
  stdDeg: Float64Array;
  /** The full bound, K × K row-major, rad². */
  covarianceRad2: Float64Array;
  sources: number;
}

interface Checked {
  m: number;
  d: number;
  theta: Float64Array; // radians
  powers: Float64Array;
  noise: number;
  n: number;
}

function checkInput(input: BoundsInput): Checked {
  if (input === null || typeof input !== 'object')
    throw new DoaInputError('bad-option', 'the bound needs an input object');
  const m = requireElementCount(input.elements);
  const d = requireSpacing(input.spacingWavelengths);
  const bearings = requireFiniteArray(input.bearingsDeg, 'bearingsDeg');
  const k = bearings.length;
  if (k < 1) throw new DoaInputError('bad-source-count', 'bearingsDeg must hold at least one bearing');
  if (k >= m)
    throw new DoaInputError(
      'bad-source-count',
      `bearingsDeg has ${k} sources; the bound needs fewer sources than elements (${m})`,
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
    theta[i] = b * DEG;
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
  return { m, d, theta, powers, noise, n };
}

/** Real K × K inverse by Gauss–Jordan with partial pivoting. */
function invertReal(a: Float64Array, k: number): Float64Array {
  const w = a.slice();
  const inv = new Float64Array(k * k);
  for (let i = 0; i < k; i++) inv[i * k + i] = 1;
  let scale = 0;
  for (let i = 0; i < w.length; i++) scale = Math.max(scale, Math.abs(w[i]));
  for (let col = 0; col < k; col++) {
    let piv = col;
    for (let r = col + 1; r < k; r++) if (Math.abs(w[r * k + col]) > Math.abs(w[piv * k + col])) piv = r;
    if (!(Math.abs(w[piv * k + col]) > scale * k * 1e-15)) {
      throw new DoaNumericalError(
        'singular-matrix',
        'the Fisher information matrix is singular: the sources cannot be told apart',
      );
    }
    if (piv !== col) {
      for (let c = 0; c < k; c++) {
        let t = w[col * k + c];
        w[col * k + c] = w[piv * k + c];
        w[piv * k + c] = t;
        t = inv[col * k + c];
        inv[col * k + c] = inv[piv * k + c];
        inv[piv * k + c] = t;
      }
    }
    const p = w[col * k + col];
    for (let c = 0; c < k; c++) {
      w[col * k + c] /= p;
      inv[col * k + c] /= p;
    }
    for (let r = 0; r < k; r++) {
      if (r === col) continue;
      const f = w[r * k + col];
      if (f === 0) continue;
      for (let c = 0; c < k; c++) {
        w[r * k + c] -= f * w[col * k + c];
        inv[r * k + c] -= f * inv[col * k + c];
      }
    }
  }
  return inv;
}

/** Gram products of A (steering) and D (its θ-derivative): G = AᴴA, AᴴD, DᴴD. */
function gramProducts(c: Checked): { g: ComplexMatrix; ad: ComplexMatrix; dd: ComplexMatrix } {
  const k = c.theta.length;
  const g = zeros(k, k);
  const ad = zeros(k, k);
  const dd = zeros(k, k);
  const kk = 2 * Math.PI * c.d;
  const s = Float64Array.from(c.theta, Math.sin);
  const cs = Float64Array.from(c.theta, Math.cos);
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
      for (let m = 0; m < c.m; m++) {
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

function crbFromChecked(c: Checked, kind: BoundKind): CrbResult {
  const k = c.theta.length;
  const { g, ad, dd } = gramProducts(c);
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
  if (kind === 'stochastic') {
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
    stdDeg[i] = Math.sqrt(v) / DEG;
  }
  return { stdDeg, covarianceRad2: cov, sources: k };
}

/** Stochastic CRB (Stoica & Nehorai 1990) for K uncorrelated sources (docs/conventions.md §5). */
export function stochasticCrb(input: BoundsInput): CrbResult {
  return crbFromChecked(checkInput(input), 'stochastic');
}

/** Deterministic CRB (Stoica & Nehorai 1989) with the sample source covariance equal to diag(sourcePowers). */
export function deterministicCrb(input: BoundsInput): CrbResult {
  return crbFromChecked(checkInput(input), 'deterministic');
}

/** Either bound by name (default stochastic). */
export function cramerRaoBound(input: BoundsInput, kind: BoundKind = 'stochastic'): CrbResult {
  if (kind !== 'stochastic' && kind !== 'deterministic')
    throw new DoaInputError('bad-option', `bound must be 'stochastic' or 'deterministic', got ${String(kind)}`);
  return crbFromChecked(checkInput(input), kind);
}

// ---------------------------------------------------------------------------
// Statistical resolution (Smith 2005)

export interface ResolutionLimitInput {
  elements: number;
  spacingWavelengths: number;
  /** Bearing of the midpoint of the pair, degrees; the pair is (centre − δ/2, centre + δ/2). */
  centerDeg: number;
  /** Linear powers of the two sources. */
  sourcePowers: [number, number] | ArrayLike<number>;
  noisePower: number;
  snapshots: number;
  bound?: BoundKind;
}

export interface ResolutionLimit {
  /** δ solving δ = √CRB(δ), degrees; null when no separation inside the visible region satisfies it. */
  deltaDeg: number | null;
  /** The same separation in u: sin(centre + δ/2) − sin(centre − δ/2). */
  deltaU: number | null;
  criterion: 'Smith (2005): δ = √(C11 + C22 − 2·C12)';
}

const SMITH_CRITERION = 'Smith (2005): δ = √(C11 + C22 − 2·C12)' as const;

function separationStdRad(c: Checked, kind: BoundKind, i: number, j: number): number {
  const r = crbFromChecked(c, kind);
  const k = r.sources;
  const v = r.covarianceRad2[i * k + i] + r.covarianceRad2[j * k + j] - 2 * r.covarianceRad2[i * k + j];
  return Math.sqrt(Math.max(0, v));
}

/** Smith's statistical resolution limit for two sources centred at `centerDeg`. */
export function statisticalResolutionLimit(input: ResolutionLimitInput): ResolutionLimit {
  if (input === null || typeof input !== 'object')
    throw new DoaInputError('bad-option', 'the resolution limit needs an input object');
  const m = requireElementCount(input.elements);
  const d = requireSpacing(input.spacingWavelengths);
  const center = requireBearing(input.centerDeg, 'centerDeg');
  if (Math.abs(center) >= 90)
    throw new DoaInputError('bad-value', `centerDeg = ${center} must lie strictly inside (−90, 90)`);
  const powers = requireFiniteArray(input.sourcePowers, 'sourcePowers', 2);
  for (let i = 0; i < 2; i++)
    if (!(powers[i] > 0))
      throw new DoaInputError('bad-value', `sourcePowers[${i}] must be greater than 0, got ${powers[i]}`);
  const noise = requirePositive(input.noisePower, 'noisePower');
  const n = requirePositiveInteger(input.snapshots, 'snapshots');
  const kind = input.bound ?? 'stochastic';
  if (kind !== 'stochastic' && kind !== 'deterministic')
    throw new DoaInputError('bad-option', `bound must be 'stochastic' or 'deterministic', got ${String(kind)}`);
  if (m < 3) return { deltaDeg: null, deltaU: null, criterion: SMITH_CRITERION };
  const thetaC = center * DEG;
  const maxDelta = 2 * (Math.PI / 2 - Math.abs(thetaC)) * (1 - 1e-9);
  // g(δ) = δ − √CRB(δ); negative for small δ (the bound grows like δ^−2), positive for large δ.
  const g = (delta: number): number => {
    const c: Checked = { m, d, theta: Float64Array.of(thetaC - delta / 2, thetaC + delta / 2), powers, noise, n };
    try {
      return delta - separationStdRad(c, kind, 0, 1);
    } catch (e) {
      if (e instanceof DoaNumericalError || e instanceof DoaInputError) return -Infinity;
      throw e;
    }
  };
  const toResult = (delta: number): ResolutionLimit => ({
    deltaDeg: delta / DEG,
    deltaU: Math.sin(thetaC + delta / 2) - Math.sin(thetaC - delta / 2),
    criterion: SMITH_CRITERION,
  });
  // Start near the Rayleigh gap (converted to θ at the centre) and bracket.
  let hi = Math.min(maxDelta, 1 / (m * d * Math.max(Math.cos(thetaC), 1e-6)));
  let lo = hi;
  if (g(hi) > 0) {
    lo = hi / 2;
    while (g(lo) > 0) {
      hi = lo;
      lo /= 2;
      if (lo < 1e-12) return toResult(lo);
    }
  } else {
    for (;;) {
      lo = hi;
      if (hi >= maxDelta) return { deltaDeg: null, deltaU: null, criterion: SMITH_CRITERION };
      hi = Math.min(maxDelta, hi * 2);
      if (g(hi) > 0) break;
    }
  }
  for (let it = 0; it < 200 && hi - lo > 1e-14 * hi; it++) {
    const mid = 0.5 * (lo + hi);
    if (g(mid) > 0) hi = mid;
    else lo = mid;
  }
  return toResult(0.5 * (lo + hi));
}

export type PairVerdict = 'resolvable' | 'needs-high-resolution' | 'unresolvable';

export interface PairResolvability {
  i: number;
  j: number;
  /** |θj − θi|, degrees. */
  separationDeg: number;
  /** |sin θi − sin θj|. */
  separationU: number;
  /** 1/(M·d). */
  rayleighGapU: number;
  /** docs/conventions.md §5: separationU < 1/(M·d). */
  belowResolvableGap: boolean;
  /** √(C_ii + C_jj − 2C_ij) of the full K-source bound at the given bearings, degrees. */
  separationStdDeg: number;
  /** Smith's limit for this pair alone, centred at its midpoint, with its two powers (degrees; null if none in view). */
  statisticalLimitDeg: number | null;
  statisticalLimitU: number | null;
  /** Smith's criterion at the given bearings: separation < √CRB(separation). */
  belowStatisticalLimit: boolean;
  /**
   * 'resolvable': above the Rayleigh gap and above the statistical limit;
   * 'needs-high-resolution': below the Rayleigh gap (a beamformer merges them) but
   *   above the statistical limit (subspace methods may separate them at this SNR and N);
   * 'unresolvable': below the statistical limit; no unbiased method can be expected to separate them.
   */
  verdict: PairVerdict;
  criterion: 'Smith (2005): δ = √(C11 + C22 − 2·C12)';
}

/** Resolvability of every source pair (i < j, 0-based indices into bearingsDeg). */
export function pairResolvability(input: BoundsInput, options: { bound?: BoundKind } = {}): PairResolvability[] {
  const c = checkInput(input);
  const kind = options.bound ?? 'stochastic';
  if (kind !== 'stochastic' && kind !== 'deterministic')
    throw new DoaInputError('bad-option', `bound must be 'stochastic' or 'deterministic', got ${String(kind)}`);
  const crb = crbFromChecked(c, kind);
  const k = crb.sources;
  const gapU = 1 / (c.m * c.d);
  const out: PairResolvability[] = [];
  for (let i = 0; i < k; i++) {
    for (let j = i + 1; j < k; j++) {
      const sepRad = Math.abs(c.theta[j] - c.theta[i]);
      const sepU = Math.abs(Math.sin(c.theta[i]) - Math.sin(c.theta[j]));
      const v = crb.covarianceRad2[i * k + i] + crb.covarianceRad2[j * k + j] - 2 * crb.covarianceRad2[i * k + j];
      const sepStd = Math.sqrt(Math.max(0, v));
      const limit = statisticalResolutionLimit({
        elements: c.m,
        spacingWavelengths: c.d,
        centerDeg: (c.theta[i] + c.theta[j]) / 2 / DEG,
        sourcePowers: [c.powers[i], c.powers[j]],
        noisePower: c.noise,
        snapshots: c.n,
        bound: kind,
      });
      const belowGap = sepU < gapU;
      const belowStat = sepRad < sepStd;
      out.push({
        i,
        j,
        separationDeg: sepRad / DEG,
        separationU: sepU,
        rayleighGapU: gapU,
        belowResolvableGap: belowGap,
        separationStdDeg: sepStd / DEG,
        statisticalLimitDeg: limit.deltaDeg,
        statisticalLimitU: limit.deltaU,
        belowStatisticalLimit: belowStat,
        verdict: belowStat ? 'unresolvable' : belowGap ? 'needs-high-resolution' : 'resolvable',
        criterion: SMITH_CRITERION,
      });
    }
  }
  return out;
}

// ---------------------------------------------------------------------------
// The separation-versus-aperture chart

export interface SeparationChartInput {
  /** Element counts to evaluate (each ≥ 2). Default 2…64. */
  elementCounts?: ArrayLike<number>;
  spacingWavelengths: number;
  /** Look direction (centre of the pair), degrees, strictly inside (−90, 90). Default 0. */
  lookDeg?: number;
  /** Per-element SNR of each of the two equal sources, dB. */
  snrDb: number;
  snapshots: number;
  bound?: BoundKind;
}

export interface SeparationChart {
  elements: Float64Array;
  apertureWavelengths: Float64Array;
  /** 1/(M·d). */
  rayleighGapU: Float64Array;
  /** The Rayleigh gap as a bearing separation centred on the look direction: 2·asin(Δu/(2·cos θ0)); NaN when it does not fit in view. */
  rayleighGapDeg: Float64Array;
  /** Smith (2005) limit, degrees, centred on the look direction; NaN when none fits in view (or M = 2). */
  statisticalLimitDeg: Float64Array;
  statisticalLimitU: Float64Array;
  criterion: 'Smith (2005): δ = √(C11 + C22 − 2·C12)';
}

/**
 * Curves for the designer's separation-versus-aperture chart: the Rayleigh gap and
 * Smith's statistical resolution limit against element count, for two equal
 * uncorrelated sources centred on the look direction.
 * Note: `arrayMetrics().rayleighGapDeg` is the one-sided broadside value
 * asin(1/(M·d)) of docs/conventions.md §5; the chart centres the pair on the look
 * direction so both curves and planned pairs share one definition of separation.
 */
export function separationVersusAperture(input: SeparationChartInput): SeparationChart {
  if (input === null || typeof input !== 'object')
    throw new DoaInputError('bad-option', 'the chart needs an input object');
  const d = requireSpacing(input.spacingWavelengths);
  const look = requireBearing(input.lookDeg ?? 0, 'lookDeg');
  if (Math.abs(look) >= 90)
    throw new DoaInputError('bad-value', `lookDeg = ${look} must lie strictly inside (−90, 90)`);
  const snrDb = requireFinite(input.snrDb, 'snrDb');
  const n = requirePositiveInteger(input.snapshots, 'snapshots');
  let counts: Float64Array;
  if (input.elementCounts === undefined) {
    counts = new Float64Array(63);
    for (let i = 0; i < 63; i++) counts[i] = i + 2;
  } else {
    counts = requireFiniteArray(input.elementCounts, 'elementCounts');
    if (counts.length === 0) throw new DoaInputError('bad-size', 'elementCounts must not be empty');
    if (counts.length > 1024)
      throw new DoaInputError('bad-size', `elementCounts has ${counts.length} entries; at most 1024 are allowed`);
    for (let i = 0; i < counts.length; i++) requireElementCount(counts[i], `elementCounts[${i}]`);
  }
  const snr = Math.pow(10, snrDb / 10);
  const cos0 = Math.cos(look * DEG);
  const len = counts.length;
  const out: SeparationChart = {
    elements: counts,
    apertureWavelengths: new Float64Array(len),
    rayleighGapU: new Float64Array(len),
    rayleighGapDeg: new Float64Array(len),
    statisticalLimitDeg: new Float64Array(len),
    statisticalLimitU: new Float64Array(len),
    criterion: SMITH_CRITERION,
  };
  for (let idx = 0; idx < len; idx++) {
    const m = counts[idx];
    out.apertureWavelengths[idx] = (m - 1) * d;
    const gapU = rayleighGap(m, d).u;
    out.rayleighGapU[idx] = gapU;
    const arg = gapU / (2 * cos0);
    const delta = arg <= 1 ? 2 * Math.asin(arg) : NaN;
    out.rayleighGapDeg[idx] =
      Number.isFinite(delta) && Math.abs(look * DEG) + delta / 2 < Math.PI / 2 ? delta / DEG : NaN;
    const lim = statisticalResolutionLimit({
      elements: m,
      spacingWavelengths: d,
      centerDeg: look,
      sourcePowers: [snr, snr],
      noisePower: 1,
      snapshots: n,
      bound: input.bound,
    });
    out.statisticalLimitDeg[idx] = lim.deltaDeg ?? NaN;
    out.statisticalLimitU[idx] = lim.deltaU ?? NaN;
  }
  return out;
}

// ---------------------------------------------------------------------------
// The v1 API answer

export interface BoundsRequest {
  array: { elements: number; spacingWavelengths: number };
  bearingsDeg: ArrayLike<number>;
  sourcePowers: ArrayLike<number>;
  noisePower: number;
  snapshots: number;
}

export interface BoundsAnswer {
  crbStdDeg: number[];
  rayleighGapU: number;
  pairs: Array<{ i: number; j: number; separationU: number; belowResolvableGap: boolean }>;
}

/**
 * The answer of POST /api/v1/bounds (docs/conventions.md §7): the stochastic CRB std per
 * source in degrees, the Rayleigh gap 1/(M·d) and, for each pair i < j (0-based),
 * |sin θi − sin θj| and the docs/conventions.md §5 gap test.
 */
export function bounds(request: BoundsRequest): BoundsAnswer {
  if (request === null || typeof request !== 'object')
    throw new DoaInputError('bad-option', 'the request must be an object');
  if (request.array === null || typeof request.array !== 'object')
    throw new DoaInputError('bad-option', 'array must be an object with elements and spacingWavelengths');
  const input: BoundsInput = {
    elements: request.array.elements,
    spacingWavelengths: request.array.spacingWavelengths,
    bearingsDeg: request.bearingsDeg,
    sourcePowers: request.sourcePowers,
    noisePower: request.noisePower,
    snapshots: request.snapshots,
  };
  const c = checkInput(input);
  const crb = crbFromChecked(c, 'stochastic');
  const gapU = 1 / (c.m * c.d);
  const pairs: BoundsAnswer['pairs'] = [];
  for (let i = 0; i < c.theta.length; i++) {
    for (let j = i + 1; j < c.theta.length; j++) {
      const sepU = Math.abs(Math.sin(c.theta[i]) - Math.sin(c.theta[j]));
      pairs.push({ i, j, separationU: sepU, belowResolvableGap: sepU < gapU });
    }
  }
  return { crbStdDeg: Array.from(crb.stdDeg), rayleighGapU: gapU, pairs };
}
