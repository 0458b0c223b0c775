/**
 * One block of a bearing–time record: STFT, per-bin covariance, source count,
 * incoherent wideband spectrum, bearings with ±σ.
 *
 * Layouts: a block arrives as one sample array per channel (channel c = element
 * c), B = plan.blockSamples samples each, values as read (any scale). Inside the
 * block, frame t starts at sample t·hop; snapshot entry m of bin k in frame t is
 * Σ_n w[n]·x_m[t·hop + n]·exp(−j2πkn/L) (docs/conventions.md §6; fft.js real FFT,
 * windows of lib/datasets/stft.ts). Per bin, R_k = X_k·X_kᴴ/T over the block's T
 * frames, exactly Hermitian (docs/conventions.md §2), and its Hermitian EVD
 * (descending).
 *
 * Source count: given, or per bin the MDL/AIC rule of docs/conventions.md §3 on R_k's
 * eigenvalues with N = T, combined as the lower median over the bins.
 *
 * Wideband spectrum (incoherent averaging of narrowband spectra, the incoherent
 * signal-subspace approach of Wax, Shan & Kailath, IEEE Trans. ASSP 32(4), 1984):
 * each bin's narrowband spectrum on the grid with its own d_k (docs/conventions.md §4:
 * MUSIC 1/‖Enᴴa‖², MVDR 1/(aᴴR⁻¹a), Bartlett aᴴRa/M²) is divided by its own
 * maximum over the grid (so every bin weighs the same and peaks at 1), then the
 * bins are averaged: P(θ) = (1/F)·Σ_k P_k(θ)/max P_k. So P ≤ 1, and 0 dB means
 * that every bin peaks at that bearing.
 *
 * Bearings:
 *  - 'spectrum-peaks': the K largest peaks of P (docs/conventions.md §4), each refined
 *    (by default) by golden-section search for the maximum of the same P, evaluated
 *    off the grid, between the neighbouring grid points;
 *  - 'per-bin-music': per bin, the minimum of ‖Enᴴa(u)‖² within half a Rayleigh gap
 *    1/(2·M·d_k) in u = sin θ of each wideband peak (golden section; an estimate on
 *    the edge of that interval is dropped); spectral MUSIC and root-MUSIC share
 *    their asymptotic variance (Stoica & Nehorai 1989);
 *  - 'per-bin-root-music': per bin, root-MUSIC (Barabell 1983, root-music.ts); each
 *    wideband peak takes the nearest unused root within half a Rayleigh gap.
 *  Per-bin estimates θ_k,i of source i are combined as Σ w θ / Σ w with
 *  w_k,i = 1/CRB_k,i, the inverse of the per-bin stochastic CRB at the wideband
 *  peak with the estimated powers (inverse-variance weighting).
 *
 * ±σ: the wideband CRB (crb.ts) at the (refined) wideband peaks, with per-bin noise
 * σ̂_k² = mean of the M − K smallest eigenvalues and powers
 * p̂_k = max(0, diag(A⁺(R_k − σ̂_k²I)A⁺ᴴ)) — the same plug-in rule as the
 * narrowband estimate runs — and the redundancy η of crb.ts. The per-bin Fisher
 * informations are computed once and serve both as weights and, summed, as the bound.
 */
import FFT from 'fft.js';
import { RAD_PER_DEG } from '../angles';
import { requireFiniteEntries } from '../checks';
import { inverse as inverseMatrix, zeros, type ComplexMatrix } from '../linalg/complex';
import { HermitianEigenWorkspace } from '../linalg/hermitian-eigen';
import { inverseFromEigen, conditionNumber, MVDR_CONDITION_LIMIT } from '../methods/beamformers';
import { musicDenominatorFromPhasors, noiseProjector, SPECTRUM_DENOMINATOR_FLOOR } from '../methods/music';
import { rootMusicElectricalAngles } from '../methods/root-music';
import { estimateSourceCount } from '../methods/source-count';
import { diagonalSums, gridAngles, gridPhasors, hermitianFormFromDiagonalSums, pickPeaks } from '../methods/spectrum';
import { stdFromFisher, windowTimeFrequencyRedundancy } from './crb';
import { BinBoundWorkspace } from './bin-bound';
import { LeadingEigenWorkspace } from './leading-eigen';
import type { WidebandPlan } from './plan';

export interface BlockBearings {
  /** Source count used in the block. */
  sourceCount: number;
  /** Ascending, degrees. */
  bearingsDeg: number[];
  /** ±σ per bearing (√ wideband CRB), degrees. */
  stdDeg: number[];
  /** Warning codes raised in this block (e.g. 'fewer-peaks-than-sources'). */
  warnings: string[];
}

export interface BlockAnalysis extends BlockBearings {
  /** Wideband spectrum on the grid, linear, normalised as described above (≤ 1). */
  spectrum: Float64Array;
}

/** Window of docs/conventions.md §6 (periodic). Same formulas as lib/datasets/stft.ts. */
export function analysisWindow(kind: WidebandPlan['window'], length: number): Float64Array {
  const w = new Float64Array(length);
  for (let n = 0; n < length; n++) {
    const c = Math.cos((2 * Math.PI * n) / length);
    w[n] = kind === 'hann' ? 0.5 - 0.5 * c : kind === 'hamming' ? 0.54 - 0.46 * c : 1;
  }
  return w;
}

const GOLDEN = (Math.sqrt(5) - 1) / 2;

/** Golden-section search for the maximum of f on [a, b]. */
function goldenMax(f: (x: number) => number, a: number, b: number, iterations: number): number {
  let x1 = b - GOLDEN * (b - a);
  let x2 = a + GOLDEN * (b - a);
  let f1 = f(x1);
  let f2 = f(x2);
  for (let i = 0; i < iterations; i++) {
    if (f1 < f2) {
      a = x1;
      x1 = x2;
      f1 = f2;
      x2 = a + GOLDEN * (b - a);
      f2 = f(x2);
    } else {
      b = x2;
      x2 = x1;
      f2 = f1;
      x1 = b - GOLDEN * (b - a);
      f1 = f(x1);
    }
  }
  return 0.5 * (a + b);
}

/** Σ_l c_l z^l Hermitian form at one electrical angle μ (c_{−l} = conj c_l). */
function formAt(cr: Float64Array, ci: Float64Array, offset: number, l: number, mu: number): number {
  const zr = Math.cos(mu);
  const zi = Math.sin(mu);
  let qr = cr[offset + l - 1];
  let qi = ci[offset + l - 1];
  for (let k = l - 2; k >= 1; k--) {
    const tr = qr * zr - qi * zi + cr[offset + k];
    qi = qr * zi + qi * zr + ci[offset + k];
    qr = tr;
  }
  return l === 1 ? cr[offset] : cr[offset] + 2 * (qr * zr - qi * zi);
}

/**
 * aᴴ·C·a at each grid phasor from the diagonal sums c_0 … c_{l−1} at cr/ci[offset …]: the
 * arithmetic of hermitianFormFromDiagonalSums (methods/spectrum.ts) point by point, bit for
 * bit, with two grid points per pass so that their Horner chains overlap.
 */
function formOnGrid(
  cr: Float64Array,
  ci: Float64Array,
  offset: number,
  l: number,
  phasors: { cos: Float64Array; sin: Float64Array },
  out: Float64Array,
): void {
  const n = out.length;
  const c0 = cr[offset];
  if (l === 1) {
    out.fill(c0);
    return;
  }
  const top = offset + l - 1;
  const cos = phasors.cos;
  const sin = phasors.sin;
  let i = 0;
  for (; i + 1 < n; i += 2) {
    const zr = cos[i];
    const zi = sin[i];
    const wr = cos[i + 1];
    const wi = sin[i + 1];
    let qr = cr[top];
    let qi = ci[top];
    let pr = qr;
    let pi = qi;
    for (let k = top - 1; k >= offset + 1; k--) {
      const ck = cr[k];
      const dk = ci[k];
      const tr = qr * zr - qi * zi + ck;
      qi = qr * zi + qi * zr + dk;
      qr = tr;
      const ur = pr * wr - pi * wi + ck;
      pi = pr * wi + pi * wr + dk;
      pr = ur;
    }
    out[i] = c0 + 2 * (qr * zr - qi * zi);
    out[i + 1] = c0 + 2 * (pr * wr - pi * wi);
  }
  for (; i < n; i++) {
    const zr = cos[i];
    const zi = sin[i];
    let qr = cr[top];
    let qi = ci[top];
    for (let k = top - 1; k >= offset + 1; k--) {
      const tr = qr * zr - qi * zi + cr[k];
      qi = qr * zi + qi * zr + ci[k];
      qr = tr;
    }
    out[i] = c0 + 2 * (qr * zr - qi * zi);
  }
}

export class BlockAnalyzer {
  readonly plan: WidebandPlan;
  readonly angles: Float64Array;
  readonly window: Float64Array;
  /** η of crb.ts for this plan. */
  readonly redundancy: number;
  private readonly fft: FFT;
  private readonly fftIn: Float64Array;
  private readonly fftOut: number[];
  private readonly fftPacked: number[];
  private readonly xRe: Float64Array; // [bin][element][frame]
  private readonly xIm: Float64Array;
  private readonly phasors: { cos: Float64Array; sin: Float64Array }[];
  private readonly formRe: Float64Array; // [bin][lag] diagonal sums of the spectrum's matrix
  private readonly formIm: Float64Array;
  private readonly normaliser: Float64Array; // per bin: max over the grid of P_k
  /** Per bin: R_b (covs[b], views into one buffer) and its EVD, reused from block to block. */
  private readonly covs: ComplexMatrix[];
  private readonly eigs: { values: Float64Array; vectors: ComplexMatrix }[];
  private readonly eigen: HermitianEigenWorkspace;
  /** MUSIC (not root-MUSIC): all eigenvalues and only the K signal eigenvectors per bin. */
  private readonly leading: LeadingEigenWorkspace;
  /** Per-bin plug-in powers and Fisher information. */
  private readonly bound: BinBoundWorkspace;
  /** Per bin: the signal eigenvectors, row j = vector j (K × M), when `leading` is used. */
  private readonly esRe: Float64Array;
  private readonly esIm: Float64Array;
  /** Scratch: one bin's Hermitian form on the grid, and its spectrum. */
  private readonly formGrid: Float64Array;
  private readonly binValues: Float64Array;

  constructor(plan: WidebandPlan) {
    this.plan = plan;
    this.angles = gridAngles(plan.grid);
    this.window = analysisWindow(plan.window, plan.fftLength);
    this.redundancy = windowTimeFrequencyRedundancy(this.window, plan.framesPerBlock, plan.blockSamples);
    this.fft = new FFT(plan.fftLength);
    this.fftIn = new Float64Array(plan.fftLength);
    this.fftOut = this.fft.createComplexArray() as number[];
    this.fftPacked = this.fft.createComplexArray() as number[];
    const nb = plan.bins.length;
    const m = plan.elements;
    this.xRe = new Float64Array(nb * plan.framesPerBlock * m);
    this.xIm = new Float64Array(nb * plan.framesPerBlock * m);
    this.phasors = Array.from(plan.binSpacing, (d) => gridPhasors(this.angles, d));
    this.formRe = new Float64Array(nb * m);
    this.formIm = new Float64Array(nb * m);
    this.normaliser = new Float64Array(nb);
    const mm = m * m;
    const covRe = new Float64Array(nb * mm);
    const covIm = new Float64Array(nb * mm);
    const vecRe = new Float64Array(nb * mm);
    const vecIm = new Float64Array(nb * mm);
    const values = new Float64Array(nb * m);
    this.covs = [];
    this.eigs = [];
    for (let b = 0; b < nb; b++) {
      const at = b * mm;
      this.covs.push({
        rows: m,
        cols: m,
        re: covRe.subarray(at, at + mm),
        im: covIm.subarray(at, at + mm),
      });
      this.eigs.push({
        values: values.subarray(b * m, (b + 1) * m),
        vectors: { rows: m, cols: m, re: vecRe.subarray(at, at + mm), im: vecIm.subarray(at, at + mm) },
      });
    }
    this.eigen = new HermitianEigenWorkspace(m);
    this.leading = new LeadingEigenWorkspace(m);
    this.bound = new BinBoundWorkspace(m, m);
    this.esRe = new Float64Array(nb * mm);
    this.esIm = new Float64Array(nb * mm);
    this.formGrid = new Float64Array(this.angles.length);
    this.binValues = new Float64Array(this.angles.length);
  }

  /**
   * STFT of the block's frames into the per-bin snapshot arrays. Two real channels share one
   * complex FFT (x = x_c + j·x_{c+1}; X_c[k] = (X[k] + conj X[L−k])/2, X_{c+1}[k] =
   * (X[k] − conj X[L−k])/(2j), a standard identity), which costs about 0.7 of two real
   * transforms with fft.js; an odd last channel takes a real transform.
   */
  private transform(channels: ArrayLike<number>[]): void {
    const { fftLength: L, hop, framesPerBlock: T, elements: m, bins } = this.plan;
    const w = this.window;
    const input = this.fftIn;
    const packed = this.fftPacked;
    const out = this.fftOut;
    const nb = bins.length;
    const xRe = this.xRe;
    const xIm = this.xIm;
    let c = 0;
    for (; c + 1 < m; c += 2) {
      const x = channels[c];
      const y = channels[c + 1];
      for (let t = 0; t < T; t++) {
        const s0 = t * hop;
        for (let n = 0; n < L; n++) {
          packed[2 * n] = w[n] * x[s0 + n];
          packed[2 * n + 1] = w[n] * y[s0 + n];
        }
        this.fft.transform(out, packed);
        for (let b = 0; b < nb; b++) {
          const k = bins[b];
          const q = L - k;
          const pr = out[2 * k];
          const pi = out[2 * k + 1];
          const qr = out[2 * q];
          const qi = out[2 * q + 1];
          const at = (b * m + c) * T + t;
          xRe[at] = 0.5 * (pr + qr);
          xIm[at] = 0.5 * (pi - qi);
          xRe[at + T] = 0.5 * (pi + qi);
          xIm[at + T] = 0.5 * (qr - pr);
        }
      }
    }
    for (; c < m; c++) {
      const x = channels[c];
      for (let t = 0; t < T; t++) {
        const s0 = t * hop;
        for (let n = 0; n < L; n++) input[n] = w[n] * x[s0 + n];
        this.fft.realTransform(out, input);
        for (let b = 0; b < nb; b++) {
          const k = bins[b];
          const at = (b * m + c) * T + t;
          xRe[at] = out[2 * k];
          xIm[at] = out[2 * k + 1];
        }
      }
    }
  }

  /**
   * R_b = X_b·X_bᴴ/T into this.covs[b] (exactly Hermitian). Each entry is summed over the
   * frames in order in a register (the same additions, in the same order, as accumulating
   * frame by frame), two columns k at a time.
   */
  private covariance(b: number): ComplexMatrix {
    const { framesPerBlock: T, elements: m } = this.plan;
    const out = this.covs[b];
    const re = out.re;
    const im = out.im;
    const xr = this.xRe;
    const xi = this.xIm;
    const base = b * m * T;
    const inv = 1 / T;
    for (let i = 0; i < m; i++) {
      const oi = base + i * T;
      let d = 0;
      for (let t = 0; t < T; t++) d += xr[oi + t] * xr[oi + t] + xi[oi + t] * xi[oi + t];
      re[i * m + i] = d * inv;
      im[i * m + i] = 0;
      let k = i + 1;
      for (; k + 1 < m; k += 2) {
        const o0 = base + k * T;
        const o1 = o0 + T;
        let r0 = 0;
        let j0 = 0;
        let r1 = 0;
        let j1 = 0;
        for (let t = 0; t < T; t++) {
          const ar = xr[oi + t];
          const ai = xi[oi + t];
          const b0r = xr[o0 + t];
          const b0i = xi[o0 + t];
          const b1r = xr[o1 + t];
          const b1i = xi[o1 + t];
          // x_i·conj(x_k)
          r0 += ar * b0r + ai * b0i;
          j0 += ai * b0r - ar * b0i;
          r1 += ar * b1r + ai * b1i;
          j1 += ai * b1r - ar * b1i;
        }
        re[i * m + k] = r0 * inv;
        im[i * m + k] = j0 * inv;
        re[i * m + k + 1] = r1 * inv;
        im[i * m + k + 1] = j1 * inv;
      }
      for (; k < m; k++) {
        const o0 = base + k * T;
        let r0 = 0;
        let j0 = 0;
        for (let t = 0; t < T; t++) {
          const ar = xr[oi + t];
          const ai = xi[oi + t];
          const b0r = xr[o0 + t];
          const b0i = xi[o0 + t];
          r0 += ar * b0r + ai * b0i;
          j0 += ai * b0r - ar * b0i;
        }
        re[i * m + k] = r0 * inv;
        im[i * m + k] = j0 * inv;
      }
      for (k = i + 1; k < m; k++) {
        re[k * m + i] = re[i * m + k];
        im[k * m + i] = -im[i * m + k];
      }
    }
    return out;
  }

  /** Analyses one block; `channels[c]` holds at least plan.blockSamples samples of channel c. */
  analyze(channels: ArrayLike<number>[]): BlockAnalysis {
    const plan = this.plan;
    const { elements: m, framesPerBlock: T, bins, binSpacing, method } = plan;
    const nb = bins.length;
    const g = this.angles.length;
    this.transform(channels);

    const covs = this.covs;
    const eigs = this.eigs;
    const counts = new Int32Array(nb);
    // What each method needs of the EVD: Bartlett the eigenvalues only (noise floor, source
    // count); MUSIC with per-bin MUSIC bearings or spectrum peaks the eigenvalues and the K
    // signal vectors (projector I − Es·Esᴴ); both through leading-eigen.ts. MVDR and root-MUSIC
    // every vector (linalg/hermitian-eigen.ts). With MDL/AIC, K is known only after every bin's
    // eigenvalues, so MUSIC then takes the vectors in a second pass.
    const leading = method === 'music' && plan.estimator !== 'per-bin-root-music';
    const valuesOnly = method === 'bartlett';
    const given = plan.sourceCount === null ? -1 : Math.min(plan.sourceCount, m - 1);
    for (let b = 0; b < nb; b++) {
      const r = this.covariance(b);
      const e = eigs[b];
      requireFiniteEntries(r.re, 'hermitianEigen: real part');
      requireFiniteEntries(r.im, 'hermitianEigen: imaginary part');
      if (leading || valuesOnly) {
        const at = b * m * m;
        const kk = leading && given >= 0 ? given : 0;
        this.leading.decompose(r.re, r.im, e.values, kk, this.esRe.subarray(at), this.esIm.subarray(at));
      } else this.eigen.decompose(r.re, r.im, e.values, e.vectors);
      if (plan.sourceCount === null) counts[b] = estimateSourceCount(e.values, T, plan.sourceCountRule);
    }
    let k: number;
    if (plan.sourceCount !== null) k = plan.sourceCount;
    else {
      const sorted = Array.from(counts).sort((a, c) => a - c);
      k = sorted[(sorted.length - 1) >> 1];
    }
    k = Math.min(k, m - 1);
    if (leading && given < 0) {
      // The count came from the eigenvalues of every bin: now the K signal vectors.
      for (let b = 0; b < nb; b++) {
        const r = covs[b];
        this.leading.decompose(
          r.re,
          r.im,
          eigs[b].values,
          k,
          this.esRe.subarray(b * m * m),
          this.esIm.subarray(b * m * m),
        );
      }
    }

    const warnings = new Set<string>();
    const spectrum = new Float64Array(g);
    for (let b = 0; b < nb; b++) {
      const values = leading
        ? this.musicSpectrumFromSignalVectors(b, k, warnings)
        : this.binSpectrum(b, covs[b], eigs[b], k, method, warnings);
      let mx = 0;
      for (let i = 0; i < g; i++) if (values[i] > mx) mx = values[i];
      this.normaliser[b] = mx > 0 ? mx : 1;
      const inv = 1 / this.normaliser[b];
      for (let i = 0; i < g; i++) spectrum[i] += values[i] * inv;
    }
    const invBins = 1 / nb;
    for (let i = 0; i < g; i++) spectrum[i] *= invBins;

    if (k === 0) return { sourceCount: 0, bearingsDeg: [], stdDeg: [], warnings: [...warnings], spectrum };

    // Wideband peaks.
    const peakIdx = pickPeaks(spectrum, k);
    if (peakIdx.length < k) warnings.add('fewer-peaks-than-sources');
    const peaks = peakIdx.map((i) => this.angles[i]);
    if (plan.refinePeaks || plan.estimator !== 'spectrum-peaks') {
      const step = plan.grid.stepDeg;
      for (let p = 0; p < peaks.length; p++) {
        const lo = Math.max(-90, peaks[p] - step);
        const hi = Math.min(90, peaks[p] + step);
        peaks[p] = goldenMax((th) => this.widebandValue(th, method), lo, hi, 40);
      }
    }
    const noise = new Float64Array(nb);
    for (let b = 0; b < nb; b++) {
      let s = 0;
      for (let j = k; j < m; j++) s += Math.max(eigs[b].values[j], 0);
      noise[b] = s / (m - k);
    }
    // Per-bin Fisher information at the wideband peaks, with the plug-in powers: the weights of
    // the per-bin estimators and, summed, the block's ±σ (the shift from the peaks to the final
    // bearings is far below the bound's scale).
    const q = peaks.length;
    const theta0 = Float64Array.from(peaks, (p) => p * RAD_PER_DEG);
    const fishers: (Float64Array | null)[] = new Array(nb);
    const total = new Float64Array(q * q);
    // estimatePowers then binFisherInformation, on buffers kept from bin to bin (bin-bound.ts).
    const store = new Float64Array(nb * q * q);
    for (let b = 0; b < nb; b++) {
      if (!this.bound.evaluate(covs[b], noise[b], binSpacing[b], theta0, T)) {
        fishers[b] = null;
        continue;
      }
      const fi = store.subarray(b * q * q, (b + 1) * q * q);
      fi.set(this.bound.fisher.subarray(0, q * q));
      fishers[b] = fi;
      for (let i = 0; i < q * q; i++) total[i] += fi[i];
    }
    let bearings = peaks;
    if (plan.estimator !== 'spectrum-peaks' && q > 0) {
      bearings = this.perBinBearings(peaks, eigs, fishers, k, warnings);
    }
    const std = stdFromFisher(total, q, this.redundancy);
    const order = bearings.map((_, i) => i).sort((a, c) => bearings[a] - bearings[c]);
    return {
      sourceCount: k,
      bearingsDeg: order.map((i) => bearings[i]),
      stdDeg: order.map((i) => std[i]),
      warnings: [...warnings],
      spectrum,
    };
  }

  /** Narrowband spectrum of bin b on the grid; stores its Hermitian-form diagonal sums for off-grid use. */
  private binSpectrum(
    b: number,
    r: ComplexMatrix,
    eig: { values: Float64Array; vectors: ComplexMatrix },
    k: number,
    method: WidebandPlan['method'],
    warnings: Set<string>,
  ): Float64Array {
    const m = r.rows;
    const phasors = this.phasors[b];
    let c: { re: Float64Array; im: Float64Array };
    if (method === 'bartlett') c = diagonalSums(r);
    else if (method === 'mvdr') {
      const pseudo = !(conditionNumber(eig.values) <= MVDR_CONDITION_LIMIT);
      if (pseudo) warnings.add('ill-conditioned-covariance');
      c = diagonalSums(inverseFromEigen(eig.values, eig.vectors, pseudo));
    } else c = diagonalSums(noiseProjector(eig.vectors, k));
    this.formRe.set(c.re, b * m);
    this.formIm.set(c.im, b * m);
    let form = hermitianFormFromDiagonalSums(c, phasors);
    if (method === 'bartlett') {
      const inv = 1 / (m * m);
      for (let i = 0; i < form.length; i++) form[i] *= inv;
      return form;
    }
    if (method === 'music') {
      // Near a null the Horner form loses relative accuracy: use the direct sum there (music.ts).
      const threshold = 1e-6 * m * c.re[0];
      for (let i = 0; i < form.length; i++) {
        if (form[i] < threshold) {
          form = musicDenominatorFromPhasors(eig.vectors, k, phasors);
          break;
        }
      }
    }
    const p = new Float64Array(form.length);
    for (let i = 0; i < form.length; i++) p[i] = 1 / Math.max(form[i], SPECTRUM_DENOMINATOR_FLOOR);
    return p;
  }

  /**
   * MUSIC spectrum of bin b on the grid from its K signal eigenvectors (this.esRe/esIm): the
   * diagonal sums of the noise projector I − Es·Esᴴ, then 1/(aᴴ·Pn·a) by Horner as binSpectrum.
   * Where the form comes near a null (the threshold of binSpectrum) the bin is decomposed in
   * full and binSpectrum's path (the direct sum over noise vectors there) is taken instead.
   * Returns this.binValues (overwritten by the next bin).
   */
  private musicSpectrumFromSignalVectors(b: number, k: number, warnings: Set<string>): Float64Array {
    const m = this.plan.elements;
    const es = b * m * m;
    const er = this.esRe;
    const ei = this.esIm;
    const cr = this.formRe;
    const ci = this.formIm;
    const off = b * m;
    for (let d = 0; d < m; d++) {
      // Σ_i Pn[i, i+d] = m·δ_d − Σ_j Σ_i e_j[i]·conj(e_j[i+d])
      let sr = 0;
      let si = 0;
      for (let j = 0; j < k; j++) {
        const row = es + j * m;
        for (let i = 0; i + d < m; i++) {
          const ar = er[row + i];
          const ai = ei[row + i];
          const br = er[row + i + d];
          const bi = ei[row + i + d];
          sr += ar * br + ai * bi;
          si += ai * br - ar * bi;
        }
      }
      cr[off + d] = (d === 0 ? m : 0) - sr;
      ci[off + d] = -si;
    }
    const form = this.formGrid;
    formOnGrid(cr, ci, off, m, this.phasors[b], form);
    const g = form.length;
    const threshold = 1e-6 * m * cr[off];
    for (let i = 0; i < g; i++) {
      if (form[i] < threshold) {
        const r = this.covs[b];
        const e = this.eigs[b];
        this.eigen.decompose(r.re, r.im, e.values, e.vectors);
        return this.binSpectrum(b, r, e, k, 'music', warnings);
      }
    }
    const p = this.binValues;
    for (let i = 0; i < g; i++) p[i] = 1 / Math.max(form[i], SPECTRUM_DENOMINATOR_FLOOR);
    return p;
  }

  /** The wideband spectrum at one bearing (degrees), off the grid, with the block's normalisers. */
  private widebandValue(thetaDeg: number, method: WidebandPlan['method']): number {
    const { elements: m, binSpacing } = this.plan;
    const u = Math.sin(thetaDeg * RAD_PER_DEG);
    const nb = binSpacing.length;
    let sum = 0;
    for (let b = 0; b < nb; b++) {
      const f = formAt(this.formRe, this.formIm, b * m, m, 2 * Math.PI * binSpacing[b] * u);
      const p = method === 'bartlett' ? f / (m * m) : 1 / Math.max(f, SPECTRUM_DENOMINATOR_FLOOR);
      sum += p / this.normaliser[b];
    }
    return sum / nb;
  }

  private perBinBearings(
    peaks: number[],
    eigs: { values: Float64Array; vectors: ComplexMatrix }[],
    fishers: (Float64Array | null)[],
    k: number,
    warnings: Set<string>,
  ): number[] {
    const { elements: m, binSpacing, estimator } = this.plan;
    const nb = binSpacing.length;
    const q = peaks.length;
    const u0 = peaks.map((p) => Math.sin(p * RAD_PER_DEG));
    const sumW = new Float64Array(q);
    const sumWU = new Float64Array(q);
    for (let b = 0; b < nb; b++) {
      const d = binSpacing[b];
      const half = 1 / (2 * m * d);
      const est = new Float64Array(q).fill(NaN);
      if (estimator === 'per-bin-music') {
        for (let p = 0; p < q; p++) {
          const lo = u0[p] - half;
          const hi = u0[p] + half;
          const f = (u: number) => -formAt(this.formRe, this.formIm, b * m, m, 2 * Math.PI * d * u);
          const u = goldenMax(f, lo, hi, 40);
          if (u - lo > 1e-6 * half && hi - u > 1e-6 * half && Math.abs(u) <= 1) est[p] = u;
        }
      } else {
        const mus = rootMusicElectricalAngles(eigs[b].vectors, k, d);
        const roots = Array.from(mus, (mu) => mu / (2 * Math.PI * d));
        const used = new Set<number>();
        for (let p = 0; p < q; p++) {
          let best = -1;
          for (let r = 0; r < roots.length; r++) {
            if (used.has(r) || Math.abs(roots[r] - u0[p]) > half || Math.abs(roots[r]) > 1) continue;
            if (best < 0 || Math.abs(roots[r] - u0[p]) < Math.abs(roots[best] - u0[p])) best = r;
          }
          if (best >= 0) {
            used.add(best);
            est[p] = roots[best];
          }
        }
      }
      const fisher = fishers[b];
      if (!fisher) continue;
      const crb = invertSymmetric(fisher, q);
      for (let p = 0; p < q; p++) {
        if (Number.isNaN(est[p]) || !crb) continue;
        const v = crb[p * q + p];
        if (!(v > 0) || !Number.isFinite(v)) continue;
        const wgt = 1 / v;
        sumW[p] += wgt;
        sumWU[p] += wgt * Math.asin(est[p]);
      }
    }
    const out: number[] = [];
    for (let p = 0; p < q; p++) {
      if (sumW[p] > 0) out.push(sumWU[p] / sumW[p] / RAD_PER_DEG);
      else {
        warnings.add('no-per-bin-estimate');
        out.push(peaks[p]);
      }
    }
    return out;
  }
}

/** p̂ = max(0, diag(A⁺(R − σ²I)A⁺ᴴ)) at the given bearings (degrees) and spacing (wavelengths). */
export function estimatePowers(r: ComplexMatrix, noise: number, m: number, d: number, bearingsDeg: number[]): number[] {
  const k = bearingsDeg.length;
  if (k === 0) return [];
  const a = zeros(m, k);
  for (let j = 0; j < k; j++) {
    const mu = 2 * Math.PI * d * Math.sin(bearingsDeg[j] * RAD_PER_DEG);
    for (let i = 0; i < m; i++) {
      a.re[i * k + j] = Math.cos(mu * i);
      a.im[i * k + j] = Math.sin(mu * i);
    }
  }
  // G = AᴴA (K × K), then A⁺ = G⁻¹Aᴴ.
  const gm = new Float64Array(2 * k * k);
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) {
      let sr = 0;
      let si = 0;
      for (let e = 0; e < m; e++) {
        const ar = a.re[e * k + i];
        const ai = -a.im[e * k + i];
        const br = a.re[e * k + j];
        const bi = a.im[e * k + j];
        sr += ar * br - ai * bi;
        si += ar * bi + ai * br;
      }
      gm[2 * (i * k + j)] = sr;
      gm[2 * (i * k + j) + 1] = si;
    }
  }
  const ginv = invertComplex(gm, k);
  if (!ginv) return new Array<number>(k).fill(0);
  const out: number[] = [];
  for (let s = 0; s < k; s++) {
    // row s of A⁺: y_e = Σ_j Ginv[s, j]·conj(a_e,j)
    const yr = new Float64Array(m);
    const yi = new Float64Array(m);
    for (let e = 0; e < m; e++) {
      let sr = 0;
      let si = 0;
      for (let j = 0; j < k; j++) {
        const gr = ginv[2 * (s * k + j)];
        const gi = ginv[2 * (s * k + j) + 1];
        const ar = a.re[e * k + j];
        const ai = -a.im[e * k + j];
        sr += gr * ar - gi * ai;
        si += gr * ai + gi * ar;
      }
      yr[e] = sr;
      yi[e] = si;
    }
    // y·(R − σ²I)·yᴴ
    let total = 0;
    for (let i = 0; i < m; i++) {
      let tr = 0;
      let ti = 0;
      for (let j = 0; j < m; j++) {
        const rr = r.re[i * m + j] - (i === j ? noise : 0);
        const ri = r.im[i * m + j];
        // (R·yᴴ)_i = Σ_j R_ij·conj(y_j)
        tr += rr * yr[j] + ri * yi[j];
        ti += ri * yr[j] - rr * yi[j];
      }
      total += yr[i] * tr - yi[i] * ti;
    }
    out.push(Math.max(0, total));
  }
  return out;
}

/** Inverse of a complex k × k matrix stored interleaved (re, im); null when singular. */
function invertComplex(a: Float64Array, k: number): Float64Array | null {
  const m = zeros(k, k);
  for (let i = 0; i < k * k; i++) {
    m.re[i] = a[2 * i];
    m.im[i] = a[2 * i + 1];
  }
  try {
    const inv = inverseMatrix(m);
    const out = new Float64Array(2 * k * k);
    for (let i = 0; i < k * k; i++) {
      out[2 * i] = inv.re[i];
      out[2 * i + 1] = inv.im[i];
    }
    return out;
  } catch {
    return null;
  }
}

function invertSymmetric(a: Float64Array, k: number): Float64Array | null {
  const m = zeros(k, k);
  m.re.set(a);
  try {
    return inverseMatrix(m).re;
  } catch {
    return null;
  }
}
