/**
 * First-order (large-N) accuracy of single-source bearing estimators, as a ratio to the
 * stochastic Cramér–Rao bound: the "efficiency factor" the planner multiplies the bound by.
 *
 * Conventions (docs/conventions.md §1–2, §4): ULA, element m = 0 … M−1 at m·d, d in
 * wavelengths; steering a_m = exp(+j·2π·d·m·sin θ); electrical angle μ = 2π·d·sin θ (radians);
 * noise power σ² per element, source power p (SNR = p/σ² per element); covariance order
 * sample covariance → forward spatial smoothing (subarray L) → forward–backward averaging.
 * Complex vectors and matrices are split re/im Float64Arrays, row-major, index origin 0.
 *
 * LS-ESPRIT on the (smoothed, optionally forward–backward averaged) covariance, one source.
 * With e = a_L/√L the signal eigenvector of the expected L × L covariance p·a_L·a_Lᴴ + σ²·I,
 * the first-order eigenvector perturbation is δe = P⊥·δR_s·e/(L·p) (every noise eigenvalue is
 * σ²), and Ψ = (J1e)ᴴ(J2e)/(J1e)ᴴ(J1e) gives, because J2·a = z·J1·a (z = e^{jμ}),
 *     δμ = Im(z*·bᴴ·δR_s·e)/((L − 1)·p),   b = (J2 − z·J1)ᴴ·J1·e,
 * where b ⊥ e. δR_s is linear in the sample covariance, so δμ = (1/N)·Σ_t x_tᴴ·G·x_t − mean
 * for a Hermitian M × M matrix G, and for circular Gaussian snapshots x ~ CN(0, R)
 *     var(μ̂) = tr(G·R·G·R)/N,  R = p·a·aᴴ + σ²·I,
 * which is evaluated in O(M²) as p²(aᴴGa)² + 2pσ²‖Ga‖² + σ⁴‖G‖²_F.
 * Without smoothing (L = M) this reduces to the closed form
 *     var(μ̂) = (1 + 1/(M·SNR)) / (N·SNR·(M − 1)²),
 * so RMSE/√CRB = √(M(M + 1)/(6(M − 1))), growing like √M: the maximal-overlap efficiency loss
 * that Rao & Hari (IEEE Trans. ASSP 37(12), 1989) describe (error ∝ M^−1 against the bound's
 * M^−3/2). The derivation is ours (first-order perturbation as in Kaveh & Barabell 1986); the
 * tests check it against an independent numpy finite-difference Jacobian of the real algorithm
 * (fixtures/planner/generate.py) and against seeded Monte Carlo runs of the engine.
 *
 * Other methods, one source, first order:
 *  - TLS-ESPRIT: the same as LS-ESPRIT (Rao & Hari 1989 report LS and TLS ESPRIT asymptotically
 *    equal) [from memory; the tests check it by Monte Carlo];
 *  - Unitary ESPRIT: treated as LS-ESPRIT with forward–backward averaging (its real-valued
 *    covariance Re(Qᴴ·R·Q) is the forward–backward average) [checked by Monte Carlo];
 *  - root-MUSIC on the full covariance: efficient for one source (Stoica & Nehorai 1989 give
 *    the MUSIC variance σ²/(2N)·aᴴUa/(dᴴP⊥d), which for K = 1 equals the stochastic CRB).
 */

export const PLANNER_METHODS = ['esprit-ls', 'esprit-tls', 'esprit-unitary', 'root-music'] as const;
export type PlannerMethod = (typeof PLANNER_METHODS)[number];

export interface EfficiencyInput {
  method: PlannerMethod;
  elements: number;
  spacingWavelengths: number;
  bearingDeg: number;
  /** Linear per-element SNR p/σ². */
  snr: number;
  /** Subarray size L (2 … M); null or M means no smoothing. */
  smoothingSubarray: number | null;
  /** Forward–backward averaging (always on for Unitary ESPRIT). */
  forwardBackward?: boolean;
}

/** The first-order variance of μ̂ at N = 1 (multiply by 1/N), rad². */
export function espritLsVarianceMu(
  elements: number,
  subarray: number,
  mu: number,
  snr: number,
  forwardBackward: boolean,
): number {
  const m = elements;
  const l = subarray;
  if (!(Number.isInteger(m) && m >= 2)) throw new RangeError(`elements must be a whole number ≥ 2, got ${m}`);
  if (!(Number.isInteger(l) && l >= 2 && l <= m)) throw new RangeError(`subarray must be 2 … ${m}, got ${l}`);
  const p = snr;
  const s2 = 1;
  const zr = Math.cos(mu);
  const zi = Math.sin(mu);
  // e and b on the subarray (length L).
  const er = new Float64Array(l);
  const ei = new Float64Array(l);
  const inv = 1 / Math.sqrt(l);
  for (let k = 0; k < l; k++) {
    er[k] = Math.cos(k * mu) * inv;
    ei[k] = Math.sin(k * mu) * inv;
  }
  const br = new Float64Array(l);
  const bi = new Float64Array(l);
  br[0] = -Math.cos(-mu) * inv;
  bi[0] = -Math.sin(-mu) * inv;
  br[l - 1] += Math.cos((l - 2) * mu) * inv;
  bi[l - 1] += Math.sin((l - 2) * mu) * inv;
  // Q = (1/(M−L+1)) Σ_i E_i·B_iᴴ (E_i, B_i: e and b placed at offset i); nonzero columns i and i+L−1 only.
  const count = m - l + 1;
  const gr = new Float64Array(m * m);
  const gi = new Float64Array(m * m);
  // Accumulate A = w·Q (w complex) into G as (A − Aᴴ)/(2j) · scale.
  const addQ = (
    vr: Float64Array,
    vi: Float64Array,
    ur: Float64Array,
    ui: Float64Array,
    wr: number,
    wi: number,
    scale: number,
  ) => {
    for (let i = 0; i < count; i++) {
      for (const kb of [0, l - 1]) {
        if (ur[kb] === 0 && ui[kb] === 0) continue;
        const col = i + kb;
        // conj(u[kb]) times w
        const cr = ur[kb] * wr + ui[kb] * wi;
        const ci = ur[kb] * wi - ui[kb] * wr;
        for (let k = 0; k < l; k++) {
          const row = i + k;
          // A[row, col] += v[k]·c/count
          const ar = (vr[k] * cr - vi[k] * ci) / count;
          const ai = (vr[k] * ci + vi[k] * cr) / count;
          // (A − Aᴴ)/(2j): entry (row,col) gets A/(2j) = (ai − j·ar)/2; entry (col,row) gets −conj(A)/(2j) = (ai + j·ar)/2.
          gr[row * m + col] += (scale * ai) / 2;
          gi[row * m + col] += (-scale * ar) / 2;
          gr[col * m + row] += (scale * ai) / 2;
          gi[col * m + row] += (scale * ar) / 2;
        }
      }
    }
  };
  const c = 1 / ((l - 1) * p);
  if (!forwardBackward) {
    addQ(er, ei, br, bi, zr, -zi, c);
  } else {
    // δμ = [Im(z*·f1) − Im(z·f2)]/(2(L−1)p), f2 built with e' = J·conj(e), b' = J·conj(b).
    const er2 = new Float64Array(l);
    const ei2 = new Float64Array(l);
    const br2 = new Float64Array(l);
    const bi2 = new Float64Array(l);
    for (let k = 0; k < l; k++) {
      er2[k] = er[l - 1 - k];
      ei2[k] = -ei[l - 1 - k];
      br2[k] = br[l - 1 - k];
      bi2[k] = -bi[l - 1 - k];
    }
    addQ(er, ei, br, bi, zr, -zi, c / 2);
    addQ(er2, ei2, br2, bi2, zr, zi, -c / 2);
  }
  // tr(GRGR) with R = p·a·aᴴ + σ²I.
  const ar = new Float64Array(m);
  const ai = new Float64Array(m);
  for (let k = 0; k < m; k++) {
    ar[k] = Math.cos(k * mu);
    ai[k] = Math.sin(k * mu);
  }
  let aGa = 0;
  let gaNorm = 0;
  let frob = 0;
  for (let r = 0; r < m; r++) {
    let sr = 0;
    let si = 0;
    for (let k = 0; k < m; k++) {
      const xr = gr[r * m + k];
      const xi = gi[r * m + k];
      frob += xr * xr + xi * xi;
      sr += xr * ar[k] - xi * ai[k];
      si += xr * ai[k] + xi * ar[k];
    }
    gaNorm += sr * sr + si * si;
    aGa += ar[r] * sr + ai[r] * si; // Re(conj(a_r)·(Ga)_r); the imaginary part vanishes (G Hermitian)
  }
  return p * p * aGa * aGa + 2 * p * s2 * gaNorm + s2 * s2 * frob;
}

/** Closed-form single-source stochastic CRB on μ at N = 1 (docs/references.md §5): (1 + 1/(M·SNR))·6/(SNR·M(M²−1)). */
export function stochasticCrbMu(elements: number, snr: number): number {
  const m = elements;
  return ((1 + 1 / (m * snr)) * 6) / (snr * m * (m * m - 1));
}

/** RMSE/√CRB of the method at this array and SNR (N-independent at first order). */
export function efficiencyFactor(input: EfficiencyInput): number {
  const m = input.elements;
  if (input.method === 'root-music') return 1;
  const l = input.smoothingSubarray ?? m;
  const fb = input.method === 'esprit-unitary' || Boolean(input.forwardBackward);
  const mu = 2 * Math.PI * input.spacingWavelengths * Math.sin((input.bearingDeg * Math.PI) / 180);
  const v = espritLsVarianceMu(m, l, mu, input.snr, fb);
  return Math.sqrt(v / stochasticCrbMu(m, input.snr));
}
