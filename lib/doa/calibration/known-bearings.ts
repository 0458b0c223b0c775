/**
 * Gain and phase calibration from reference recordings with sources at known bearings.
 *
 * Model (docs/conventions.md §9): x_m = g_m · Σ_k a_m(θ_k) s_k + n_m, with g_1 = 1.
 * In a recording with K uncorrelated sources at known bearings, the signal subspace
 * of R = X·Xᴴ/N is spanned by G·a(θ_k), G = diag(g), so the noise-subspace projector
 * P_n = E_n·E_nᴴ annihilates every G·a(θ_k) = diag(a(θ_k))·g. The estimate is
 *
 *   ĝ = argmin_g  Σ_r Σ_k ‖P_n,r · diag(a(θ_rk)) · g‖²  subject to g_1 = 1,
 *     = argmin_g  gᴴ·Q·g,   Q = Σ_r Σ_k diag(a(θ_rk))ᴴ · P_n,r · diag(a(θ_rk)),
 *
 * the gain/phase step of Weiss & Friedlander, "Eigenstructure methods for direction
 * finding with sensor gain and phase uncertainties", Circuits, Systems and Signal
 * Processing 9(3), 1990, pp. 271–300, with the bearings held at their known values
 * (their closed form ĝ = Q⁻¹w / (wᵀQ⁻¹w), w = e_1; the equation number is not quoted
 * because it is from memory). Several references are fitted jointly by summing their Q
 * (docs/references.md §12). With the constraint written as g = [1; h], the minimiser
 * solves Q₂₂·h = −Q₂₁, which stays well posed when the data are noise-free (Q singular).
 *
 * Per-element standard deviations come from a delete-one-block jackknife over the
 * snapshots (common practice; Efron & Tibshirani, "An Introduction to the Bootstrap",
 * 1993, ch. 11): the N snapshots of every reference are cut into B contiguous blocks,
 * block b is left out of every reference at once, and var = (B−1)/B · Σ_b (θ_(b) − θ̄)².
 */
import { DoaInputError } from '../errors';
import { requireSpacing } from '../checks';
import { electricalAngle } from '../angles';
import { ComplexMatrix, solve, zeros } from '../linalg/complex';
import { hermitianEigen } from '../linalg/hermitian-eigen';
import type { ElementGains, ElementGainState } from './gains';

/** One reference recording: N × M rows (the file layout) and its sources at known bearings. */
export interface CalibrationReference {
  rows: ComplexMatrix;
  bearingsDeg: number[];
}

/** Sums of x·xᴴ over contiguous snapshot blocks of one reference, so any subset's covariance is cheap. */
export interface ReferenceBlocks {
  elements: number;
  snapshots: number;
  /** Per block: the M × M sum Σ x·xᴴ (not divided by the count) and the count. */
  sums: ComplexMatrix[];
  counts: number[];
  bearingsDeg: number[];
}

export const DEFAULT_JACKKNIFE_BLOCKS = 20;

function assertReference(ref: CalibrationReference, index: number, elements: number): void {
  const where = `reference ${index + 1}`;
  if (ref.rows.cols !== elements)
    throw new DoaInputError(
      'bad-size',
      `${where} has ${ref.rows.cols} channels but the array has ${elements} elements`,
    );
  if (ref.rows.rows < elements)
    throw new DoaInputError(
      'bad-size',
      `${where} has ${ref.rows.rows} snapshots, fewer than its ${elements} elements; the covariance would be singular`,
    );
  if (!Array.isArray(ref.bearingsDeg) || ref.bearingsDeg.length < 1)
    throw new DoaInputError('bad-value', `${where} needs at least one known bearing`);
  if (ref.bearingsDeg.length >= elements)
    throw new DoaInputError(
      'bad-size',
      `${where} gives ${ref.bearingsDeg.length} bearings; at most ${elements - 1} fit an array of ${elements} elements`,
    );
  for (const b of ref.bearingsDeg)
    if (!Number.isFinite(b) || b < -90 || b > 90)
      throw new DoaInputError('bad-value', `${where}: bearing ${b}° lies outside −90° … 90°`);
}

/** Cuts one reference into `blocks` contiguous snapshot blocks and sums x·xᴴ in each. */
export function referenceBlocks(ref: CalibrationReference, blocks = DEFAULT_JACKKNIFE_BLOCKS): ReferenceBlocks {
  const m = ref.rows.cols;
  const n = ref.rows.rows;
  const b = Math.max(1, Math.min(blocks, n));
  const sums: ComplexMatrix[] = [];
  const counts: number[] = [];
  const { re, im } = ref.rows;
  for (let k = 0; k < b; k++) {
    const start = Math.floor((k * n) / b);
    const end = Math.floor(((k + 1) * n) / b);
    const s = zeros(m, m);
    for (let t = start; t < end; t++) {
      const o = t * m;
      for (let i = 0; i < m; i++) {
        const xr = re[o + i];
        const xi = im[o + i];
        for (let j = i; j < m; j++) {
          // x_i · conj(x_j)
          const yr = re[o + j];
          const yi = im[o + j];
          s.re[i * m + j] += xr * yr + xi * yi;
          s.im[i * m + j] += xi * yr - xr * yi;
        }
      }
    }
    for (let i = 0; i < m; i++)
      for (let j = 0; j < i; j++) {
        s.re[i * m + j] = s.re[j * m + i];
        s.im[i * m + j] = -s.im[j * m + i];
      }
    sums.push(s);
    counts.push(end - start);
  }
  return { elements: m, snapshots: n, sums, counts, bearingsDeg: ref.bearingsDeg.slice() };
}

/** The covariance of a reference with block `leaveOut` (or none, −1) left out. */
export function blockCovariance(blocks: ReferenceBlocks, leaveOut = -1): ComplexMatrix {
  const m = blocks.elements;
  const r = zeros(m, m);
  let count = 0;
  for (let b = 0; b < blocks.sums.length; b++) {
    if (b === leaveOut) continue;
    const s = blocks.sums[b];
    for (let i = 0; i < m * m; i++) {
      r.re[i] += s.re[i];
      r.im[i] += s.im[i];
    }
    count += blocks.counts[b];
  }
  for (let i = 0; i < m * m; i++) {
    r.re[i] /= count;
    r.im[i] /= count;
  }
  return r;
}

/** Noise-subspace projector P_n = I − E_s·E_sᴴ of R for K sources, and R's eigenvalues. */
export function noiseProjectorOf(r: ComplexMatrix, k: number): { pn: ComplexMatrix; eigenvalues: Float64Array } {
  const m = r.rows;
  const { values, vectors } = hermitianEigen(r);
  const pn = zeros(m, m);
  for (let i = 0; i < m; i++) pn.re[i * m + i] = 1;
  for (let c = 0; c < k; c++) {
    for (let i = 0; i < m; i++) {
      const ar = vectors.re[i * m + c];
      const ai = vectors.im[i * m + c];
      for (let j = 0; j < m; j++) {
        const br = vectors.re[j * m + c];
        const bi = vectors.im[j * m + c];
        // e_i · conj(e_j)
        pn.re[i * m + j] -= ar * br + ai * bi;
        pn.im[i * m + j] -= ai * br - ar * bi;
      }
    }
  }
  return { pn, eigenvalues: values };
}

/** Q = Σ_k diag(a_k)ᴴ · P_n · diag(a_k) for one reference: Q_ij = conj(a_ki)·P_ij·a_kj. */
export function quadraticForm(pn: ComplexMatrix, bearingsDeg: readonly number[], d: number): ComplexMatrix {
  const m = pn.rows;
  const q = zeros(m, m);
  for (const bearing of bearingsDeg) {
    const mu = electricalAngle(bearing, d);
    for (let i = 0; i < m; i++) {
      for (let j = 0; j < m; j++) {
        // conj(a_i)·a_j = exp(j·μ·(j − i))
        const ph = mu * (j - i);
        const c = Math.cos(ph);
        const s = Math.sin(ph);
        const pr = pn.re[i * m + j];
        const pi = pn.im[i * m + j];
        q.re[i * m + j] += pr * c - pi * s;
        q.im[i * m + j] += pr * s + pi * c;
      }
    }
  }
  return q;
}

/** Adds Q matrices. */
export function sumForms(forms: readonly ComplexMatrix[]): ComplexMatrix {
  const m = forms[0].rows;
  const out = zeros(m, m);
  for (const f of forms)
    for (let i = 0; i < m * m; i++) {
      out.re[i] += f.re[i];
      out.im[i] += f.im[i];
    }
  return out;
}

/** ĝ = argmin gᴴQg with g_1 = 1: g = [1; h], Q₂₂·h = −Q₂₁. */
export function minimiseWithUnitFirst(q: ComplexMatrix): ElementGains {
  const m = q.rows;
  const re = new Float64Array(m);
  const im = new Float64Array(m);
  re[0] = 1;
  if (m === 1) return { re, im };
  const q22 = zeros(m - 1, m - 1);
  const rhs = zeros(m - 1, 1);
  // A tiny relative ridge keeps a noise-free (exactly singular) Q solvable without moving a noisy answer.
  let trace = 0;
  for (let i = 0; i < m; i++) trace += q.re[i * m + i];
  const ridge = 1e-13 * Math.max(trace / m, 1e-300);
  for (let i = 1; i < m; i++) {
    for (let j = 1; j < m; j++) {
      q22.re[(i - 1) * (m - 1) + (j - 1)] = q.re[i * m + j];
      q22.im[(i - 1) * (m - 1) + (j - 1)] = q.im[i * m + j];
    }
    q22.re[(i - 1) * (m - 1) + (i - 1)] += ridge;
    rhs.re[i - 1] = -q.re[i * m];
    rhs.im[i - 1] = -q.im[i * m];
  }
  const h = solve(q22, rhs);
  for (let i = 1; i < m; i++) {
    re[i] = h.re[i - 1];
    im[i] = h.im[i - 1];
  }
  return { re, im };
}

/** gᴴQg / gᴴg: the fraction of the calibrated steering vectors' energy outside the signal subspaces. */
export function normalisedResidual(q: ComplexMatrix, g: ElementGains, sources: number): number {
  const m = q.rows;
  let num = 0;
  let den = 0;
  for (let i = 0; i < m; i++) {
    den += g.re[i] * g.re[i] + g.im[i] * g.im[i];
    let tr = 0;
    let ti = 0;
    for (let j = 0; j < m; j++) {
      tr += q.re[i * m + j] * g.re[j] - q.im[i * m + j] * g.im[j];
      ti += q.re[i * m + j] * g.im[j] + q.im[i * m + j] * g.re[j];
    }
    num += g.re[i] * tr + g.im[i] * ti;
  }
  return num / (den * Math.max(1, sources));
}

/** Gain in dB and phase in degrees of each element; phase wrapped near `around` (default 0). */
export function statesOf(g: ElementGains, around?: readonly ElementGainState[]): ElementGainState[] {
  const out: ElementGainState[] = [];
  for (let i = 0; i < g.re.length; i++) {
    const amp = Math.hypot(g.re[i], g.im[i]);
    let ph = (Math.atan2(g.im[i], g.re[i]) * 180) / Math.PI;
    const centre = around ? around[i].phaseDeg : 0;
    while (ph - centre > 180) ph -= 360;
    while (ph - centre <= -180) ph += 360;
    out.push({ gainDb: 20 * Math.log10(amp), phaseDeg: ph });
  }
  return out;
}

/** Per-reference material for fits of any subset of references, full and jackknife. */
export interface PreparedReference {
  blocks: ReferenceBlocks;
  /** Q of the whole reference. */
  form: ComplexMatrix;
  /** Q with block b left out, one per block (aligned across references by block index). */
  jackknifeForms: ComplexMatrix[];
  /** Noise-subspace projectors, whole and per left-out block (self-calibration re-forms Q from them). */
  projector: ComplexMatrix;
  jackknifeProjectors: ComplexMatrix[];
  eigenvalues: Float64Array;
  covariance: ComplexMatrix;
}

export function prepareReference(
  ref: CalibrationReference,
  index: number,
  spacingWavelengths: number,
  blocks = DEFAULT_JACKKNIFE_BLOCKS,
): PreparedReference {
  assertReference(ref, index, ref.rows.cols);
  const b = referenceBlocks(ref, blocks);
  const k = ref.bearingsDeg.length;
  const covariance = blockCovariance(b);
  const full = noiseProjectorOf(covariance, k);
  const form = quadraticForm(full.pn, ref.bearingsDeg, spacingWavelengths);
  const jackknifeProjectors = b.sums.map((_, leave) => noiseProjectorOf(blockCovariance(b, leave), k).pn);
  const jackknifeForms = jackknifeProjectors.map((pn) => quadraticForm(pn, ref.bearingsDeg, spacingWavelengths));
  return {
    blocks: b,
    form,
    jackknifeForms,
    projector: full.pn,
    jackknifeProjectors,
    eigenvalues: full.eigenvalues,
    covariance,
  };
}

export interface GainFit {
  gains: ElementGains;
  states: ElementGainState[];
  /** Jackknife standard deviations per element (element 1: 0, it is the reference). */
  gainStdDb: number[];
  phaseStdDeg: number[];
  /** Jackknife replicates' states (for consistency statistics). */
  replicates: ElementGainState[][];
}

/** Fits the references named by `use` jointly, with jackknife standard deviations. */
export function fitSubset(prepared: readonly PreparedReference[], use: readonly number[]): GainFit {
  if (use.length === 0) throw new DoaInputError('bad-size', 'no reference to fit');
  const gains = minimiseWithUnitFirst(sumForms(use.map((i) => prepared[i].form)));
  const states = statesOf(gains);
  const blocks = Math.min(...use.map((i) => prepared[i].jackknifeForms.length));
  const replicates: ElementGainState[][] = [];
  for (let b = 0; b < blocks; b++) {
    const g = minimiseWithUnitFirst(sumForms(use.map((i) => prepared[i].jackknifeForms[b])));
    replicates.push(statesOf(g, states));
  }
  const m = states.length;
  const gainStdDb = new Array<number>(m).fill(0);
  const phaseStdDeg = new Array<number>(m).fill(0);
  if (blocks >= 2) {
    for (let i = 1; i < m; i++) {
      let mg = 0;
      let mp = 0;
      for (const r of replicates) {
        mg += r[i].gainDb;
        mp += r[i].phaseDeg;
      }
      mg /= blocks;
      mp /= blocks;
      let vg = 0;
      let vp = 0;
      for (const r of replicates) {
        vg += (r[i].gainDb - mg) ** 2;
        vp += (r[i].phaseDeg - mp) ** 2;
      }
      gainStdDb[i] = Math.sqrt(((blocks - 1) / blocks) * vg);
      phaseStdDeg[i] = Math.sqrt(((blocks - 1) / blocks) * vp);
    }
  }
  return { gains, states, gainStdDb, phaseStdDeg, replicates };
}

export interface KnownBearingsOptions {
  spacingWavelengths: number;
  /** Jackknife blocks per reference (default 20, at most N). */
  blocks?: number;
  /** Called with the finished share 0 … 1. */
  onProgress?: (fraction: number) => void;
}

/** Prepares every reference (the costly part: one EVD per reference and jackknife block). */
export function prepareReferences(
  references: readonly CalibrationReference[],
  options: KnownBearingsOptions,
): PreparedReference[] {
  requireSpacing(options.spacingWavelengths);
  if (references.length === 0) throw new DoaInputError('bad-size', 'give at least one reference recording');
  const m = references[0].rows.cols;
  references.forEach((r, i) => assertReference(r, i, m));
  return references.map((ref, i) => {
    const p = prepareReference(ref, i, options.spacingWavelengths, options.blocks);
    options.onProgress?.((i + 1) / references.length);
    return p;
  });
}

/** The joint known-bearings fit of every reference. */
export function knownBearingsCalibration(
  references: readonly CalibrationReference[],
  options: KnownBearingsOptions,
): GainFit {
  const prepared = prepareReferences(references, options);
  return fitSubset(
    prepared,
    prepared.map((_, i) => i),
  );
}
