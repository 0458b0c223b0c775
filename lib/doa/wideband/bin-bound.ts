/**
 * The per-bin plug-in powers and Fisher information of analyze.ts without allocations: the
 * same quantities as estimatePowers (analyze.ts) followed by binFisherInformation (crb.ts),
 * computed from one steering matrix per bin on buffers kept from bin to bin. They agree with
 * those two functions to rounding (tests/lib/doa/wideband-bin-bound.test.ts); the K × K
 * systems are solved by Gaussian elimination with partial pivoting and the singularity test
 * of linalg/complex.ts `solve` (pivot ≤ n·ε·max|entry|: singular).
 *
 * Layouts: K × K complex matrices interleaved (re, im), row-major.
 */
import type { ComplexMatrix } from '../linalg/complex';

export class BinBoundWorkspace {
  readonly elements: number;
  readonly maxSources: number;
  /** Plug-in powers p̂ of the last evaluate() (first K entries). */
  readonly powers: Float64Array;
  /** Fisher information of the last evaluate() (K × K real, row-major), when it returned true. */
  readonly fisher: Float64Array;
  private readonly ar: Float64Array; // steering, [element][source]
  private readonly ai: Float64Array;
  private readonly g: Float64Array;
  private readonly ad: Float64Array;
  private readonly dd: Float64Array;
  private readonly ginv: Float64Array;
  private readonly ginvAd: Float64Array;
  private readonly work: Float64Array;
  private readonly rhs: Float64Array;
  private readonly arA: Float64Array;
  private readonly lu: Float64Array;
  private readonly yr: Float64Array;
  private readonly yi: Float64Array;

  constructor(elements: number, maxSources: number) {
    const m = elements;
    const k = Math.max(1, maxSources);
    this.elements = m;
    this.maxSources = k;
    this.powers = new Float64Array(k);
    this.fisher = new Float64Array(k * k);
    this.ar = new Float64Array(m * k);
    this.ai = new Float64Array(m * k);
    this.g = new Float64Array(2 * k * k);
    this.ad = new Float64Array(2 * k * k);
    this.dd = new Float64Array(2 * k * k);
    this.ginv = new Float64Array(2 * k * k);
    this.ginvAd = new Float64Array(2 * k * k);
    this.work = new Float64Array(2 * k * k);
    this.rhs = new Float64Array(2 * k * k);
    this.arA = new Float64Array(2 * k * k);
    this.lu = new Float64Array(2 * k * k);
    this.yr = new Float64Array(m);
    this.yi = new Float64Array(m);
  }

  /**
   * Powers p̂ = max(0, diag(A⁺(R − σ²I)A⁺ᴴ)) at bearings θ (radians, K ≤ maxSources) for a bin of
   * spacing d wavelengths into this.powers; then, when some p̂ > 0, the stochastic Fisher
   * information of crb.ts binFisherInformation for N = snapshots into this.fisher and true;
   * false where binFisherInformation gives null (or all powers are zero).
   */
  evaluate(r: ComplexMatrix, noise: number, d: number, thetaRad: ArrayLike<number>, snapshots: number): boolean {
    const m = this.elements;
    const k = thetaRad.length;
    if (k > this.maxSources)
      throw new RangeError(`BinBoundWorkspace: ${k} sources for a workspace of ${this.maxSources}`);
    const { ar, ai, g, ad, dd, ginv, powers, yr, yi } = this;
    powers.fill(0);
    if (k === 0) return false;
    const kk = 2 * Math.PI * d;
    for (let j = 0; j < k; j++) {
      const mu = kk * Math.sin(thetaRad[j]);
      for (let e = 0; e < m; e++) {
        ar[e * k + j] = Math.cos(mu * e);
        ai[e * k + j] = Math.sin(mu * e);
      }
    }
    // G = AᴴA, AᴴD and DᴴD with D_ej = j·kk·cosθ_j·e·a_ej (as bounds/crb.ts ulaGramProducts).
    for (let i = 0; i < k; i++) {
      const ci = Math.cos(thetaRad[i]);
      for (let j = 0; j < k; j++) {
        let s0r = 0;
        let s0i = 0;
        let s1r = 0;
        let s1i = 0;
        let s2r = 0;
        let s2i = 0;
        for (let e = 0; e < m; e++) {
          const xr = ar[e * k + i];
          const xi = ai[e * k + i];
          const zr = ar[e * k + j];
          const zi = ai[e * k + j];
          // conj(a_ei)·a_ej
          const pr = xr * zr + xi * zi;
          const pi = xr * zi - xi * zr;
          s0r += pr;
          s0i += pi;
          s1r += e * pr;
          s1i += e * pi;
          s2r += e * e * pr;
          s2i += e * e * pi;
        }
        const at = 2 * (i * k + j);
        g[at] = s0r;
        g[at + 1] = s0i;
        const fj = kk * Math.cos(thetaRad[j]);
        ad[at] = -fj * s1i;
        ad[at + 1] = fj * s1r;
        const fij = kk * kk * ci * Math.cos(thetaRad[j]);
        dd[at] = fij * s2r;
        dd[at + 1] = fij * s2i;
      }
    }
    // G⁻¹ (singular: zero powers, no information).
    identity(ginv, k);
    if (!this.solveInPlace(g, ginv, k, k)) return false;
    // Powers: row s of A⁺ = G⁻¹Aᴴ is y_e = Σ_j G⁻¹[s, j]·conj(a_ej); p̂_s = y·(R − σ²I)·yᴴ.
    const re = r.re;
    const im = r.im;
    let any = false;
    for (let s = 0; s < k; s++) {
      for (let e = 0; e < m; e++) {
        let sr = 0;
        let si = 0;
        for (let j = 0; j < k; j++) {
          const gr = ginv[2 * (s * k + j)];
          const gi = ginv[2 * (s * k + j) + 1];
          const xr = ar[e * k + j];
          const xi = -ai[e * k + j];
          sr += gr * xr - gi * xi;
          si += gr * xi + gi * xr;
        }
        yr[e] = sr;
        yi[e] = si;
      }
      let total = 0;
      for (let i = 0; i < m; i++) {
        let tr = 0;
        let ti = 0;
        for (let j = 0; j < m; j++) {
          const rr = re[i * m + j] - (i === j ? noise : 0);
          const ri = im[i * m + j];
          tr += rr * yr[j] + ri * yi[j];
          ti += ri * yr[j] - rr * yi[j];
        }
        total += yr[i] * tr - yi[i] * ti;
      }
      powers[s] = Math.max(0, total);
      if (powers[s] > 0) any = true;
    }
    if (!any) return false;
    // G⁻¹·AᴴD (solve(g, ad) in crb.ts), then arA = G·(P·G + σ²I)⁻¹.
    const { ginvAd, work, rhs, arA, fisher } = this;
    ginvAd.fill(0);
    for (let i = 0; i < k; i++) {
      for (let j = 0; j < k; j++) {
        let sr = 0;
        let si = 0;
        for (let l = 0; l < k; l++) {
          const xr = ginv[2 * (i * k + l)];
          const xi = ginv[2 * (i * k + l) + 1];
          const zr = ad[2 * (l * k + j)];
          const zi = ad[2 * (l * k + j) + 1];
          sr += xr * zr - xi * zi;
          si += xr * zi + xi * zr;
        }
        ginvAd[2 * (i * k + j)] = sr;
        ginvAd[2 * (i * k + j) + 1] = si;
      }
    }
    for (let i = 0; i < k; i++) {
      for (let j = 0; j < k; j++) {
        const at = 2 * (i * k + j);
        work[at] = powers[i] * g[at] + (i === j ? noise : 0);
        work[at + 1] = powers[i] * g[at + 1];
      }
    }
    identity(rhs, k);
    if (!this.solveInPlace(work, rhs, k, k)) return false;
    for (let i = 0; i < k; i++) {
      for (let j = 0; j < k; j++) {
        let sr = 0;
        let si = 0;
        for (let l = 0; l < k; l++) {
          const xr = g[2 * (i * k + l)];
          const xi = g[2 * (i * k + l) + 1];
          const zr = rhs[2 * (l * k + j)];
          const zi = rhs[2 * (l * k + j) + 1];
          sr += xr * zr - xi * zi;
          si += xr * zi + xi * zr;
        }
        arA[2 * (i * k + j)] = sr;
        arA[2 * (i * k + j) + 1] = si;
      }
    }
    const factor = (2 * snapshots) / noise;
    for (let i = 0; i < k; i++) {
      for (let j = 0; j < k; j++) {
        let sr = 0;
        let si = 0;
        for (let l = 0; l < k; l++) {
          const xr = ad[2 * (l * k + i)];
          const xi = -ad[2 * (l * k + i) + 1];
          const zr = ginvAd[2 * (l * k + j)];
          const zi = ginvAd[2 * (l * k + j) + 1];
          sr += xr * zr - xi * zi;
          si += xr * zi + xi * zr;
        }
        const hr = dd[2 * (i * k + j)] - sr;
        const hi = dd[2 * (i * k + j) + 1] - si;
        const br = powers[j] * arA[2 * (j * k + i)] * powers[i];
        const bi = powers[j] * arA[2 * (j * k + i) + 1] * powers[i];
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
    return true;
  }

  /**
   * B ← A⁻¹·B (A: k × k, B: k × p, interleaved) by elimination with partial pivoting; A is
   * copied first (not mutated). False when a pivot is at most k·ε·max|A| (singular).
   */
  private solveInPlace(a: Float64Array, b: Float64Array, k: number, p: number): boolean {
    const c = this.lu;
    c.set(a.subarray(0, 2 * k * k));
    let scale2 = 0;
    for (let i = 0; i < k * k; i++) scale2 = Math.max(scale2, c[2 * i] * c[2 * i] + c[2 * i + 1] * c[2 * i + 1]);
    const tiny = Math.sqrt(scale2) * k * Number.EPSILON;
    for (let col = 0; col < k; col++) {
      let piv = col;
      let best = -1;
      for (let rr = col; rr < k; rr++) {
        const x = c[2 * (rr * k + col)];
        const y = c[2 * (rr * k + col) + 1];
        const mag = x * x + y * y;
        if (mag > best) {
          best = mag;
          piv = rr;
        }
      }
      if (!(Math.sqrt(best) > tiny)) return false;
      if (piv !== col) {
        for (let q = 0; q < 2 * k; q++) {
          const t = c[2 * col * k + q];
          c[2 * col * k + q] = c[2 * piv * k + q];
          c[2 * piv * k + q] = t;
        }
        for (let q = 0; q < 2 * p; q++) {
          const t = b[2 * col * p + q];
          b[2 * col * p + q] = b[2 * piv * p + q];
          b[2 * piv * p + q] = t;
        }
      }
      const pr = c[2 * (col * k + col)];
      const pi = c[2 * (col * k + col) + 1];
      const den = pr * pr + pi * pi;
      for (let rr = col + 1; rr < k; rr++) {
        const xr = c[2 * (rr * k + col)];
        const xi = c[2 * (rr * k + col) + 1];
        if (xr === 0 && xi === 0) continue;
        const fr = (xr * pr + xi * pi) / den;
        const fi = (xi * pr - xr * pi) / den;
        for (let q = col; q < k; q++) {
          const ur = c[2 * (col * k + q)];
          const ui = c[2 * (col * k + q) + 1];
          c[2 * (rr * k + q)] -= fr * ur - fi * ui;
          c[2 * (rr * k + q) + 1] -= fr * ui + fi * ur;
        }
        for (let q = 0; q < p; q++) {
          const ur = b[2 * (col * p + q)];
          const ui = b[2 * (col * p + q) + 1];
          b[2 * (rr * p + q)] -= fr * ur - fi * ui;
          b[2 * (rr * p + q) + 1] -= fr * ui + fi * ur;
        }
      }
    }
    for (let rr = k - 1; rr >= 0; rr--) {
      const pr = c[2 * (rr * k + rr)];
      const pi = c[2 * (rr * k + rr) + 1];
      const den = pr * pr + pi * pi;
      for (let q = 0; q < p; q++) {
        let sr = b[2 * (rr * p + q)];
        let si = b[2 * (rr * p + q) + 1];
        for (let l = rr + 1; l < k; l++) {
          const ur = c[2 * (rr * k + l)];
          const ui = c[2 * (rr * k + l) + 1];
          const vr = b[2 * (l * p + q)];
          const vi = b[2 * (l * p + q) + 1];
          sr -= ur * vr - ui * vi;
          si -= ur * vi + ui * vr;
        }
        // (sr + j·si) / pivot
        b[2 * (rr * p + q)] = (sr * pr + si * pi) / den;
        b[2 * (rr * p + q) + 1] = (si * pr - sr * pi) / den;
      }
    }
    return true;
  }
}

function identity(x: Float64Array, k: number): void {
  x.fill(0);
  for (let i = 0; i < k; i++) x[2 * (i * k + i)] = 1;
}
