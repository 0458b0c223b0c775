/**
 * Seeded reference recordings for the calibration tests: sources at bearings θ_k,
 * optional coherent image sources (a reflection ρ·a(θ'_k) added to a(θ_k), the
 * image-source model of one reflecting boundary), element gains g_m applied to
 * the signal only, then white noise (docs/conventions.md §9).
 * Rows are N × M (the snapshot-file layout).
 */
import {
  SeededRandom,
  conjugateTranspose,
  electricalAngle,
  inverse,
  multiply,
  multiplyConjugateTransposeLeft,
  zeros,
  type ComplexMatrix,
} from '@/lib/doa';
import { complexGains, type ElementGainState } from '@/lib/doa/calibration';

export interface ImageSource {
  bearingDeg: number;
  /** Complex reflection coefficient (re, im). */
  re: number;
  im: number;
}

export interface SimulatedReference {
  elements: number;
  spacingWavelengths: number;
  bearingsDeg: number[];
  /** Linear powers (default 1). */
  powers?: number[];
  noisePower: number;
  snapshots: number;
  seed: number;
  states?: ElementGainState[];
  /** One image per source (or null), coherent with it. */
  images?: (ImageSource | null)[];
}

export function simulateReference(o: SimulatedReference): ComplexMatrix {
  const m = o.elements;
  const n = o.snapshots;
  const rng = new SeededRandom(o.seed);
  const g = complexGains(o.states ?? Array.from({ length: m }, () => ({ gainDb: 0, phaseDeg: 0 })));
  // Effective steering per source (with its image), then gains.
  const vr: Float64Array[] = [];
  const vi: Float64Array[] = [];
  o.bearingsDeg.forEach((b, k) => {
    const re = new Float64Array(m);
    const im = new Float64Array(m);
    const mu = electricalAngle(b, o.spacingWavelengths);
    const img = o.images?.[k] ?? null;
    const mu2 = img ? electricalAngle(img.bearingDeg, o.spacingWavelengths) : 0;
    for (let i = 0; i < m; i++) {
      let ar = Math.cos(mu * i);
      let ai = Math.sin(mu * i);
      if (img) {
        const c = Math.cos(mu2 * i);
        const s = Math.sin(mu2 * i);
        ar += img.re * c - img.im * s;
        ai += img.re * s + img.im * c;
      }
      re[i] = g.re[i] * ar - g.im[i] * ai;
      im[i] = g.re[i] * ai + g.im[i] * ar;
    }
    vr.push(re);
    vi.push(im);
  });
  const powers = o.powers ?? o.bearingsDeg.map(() => 1);
  const out = { rows: n, cols: m, re: new Float64Array(n * m), im: new Float64Array(n * m) };
  const ns = Math.sqrt(o.noisePower / 2);
  for (let t = 0; t < n; t++) {
    for (let k = 0; k < o.bearingsDeg.length; k++) {
      const a = Math.sqrt(powers[k] / 2);
      const sr = a * rng.normal();
      const si = a * rng.normal();
      for (let i = 0; i < m; i++) {
        out.re[t * m + i] += vr[k][i] * sr - vi[k][i] * si;
        out.im[t * m + i] += vr[k][i] * si + vi[k][i] * sr;
      }
    }
    for (let i = 0; i < m; i++) {
      out.re[t * m + i] += ns * rng.normal();
      out.im[t * m + i] += ns * rng.normal();
    }
  }
  return out;
}

/** Seeded random element errors: gain uniform in ±gainDb, phase uniform in ±phaseDeg; element 1 is 0 dB, 0°. */
export function randomStates(m: number, seed: number, gainDb = 2, phaseDeg = 20): ElementGainState[] {
  const rng = new SeededRandom(seed);
  return Array.from({ length: m }, (_, i) =>
    i === 0
      ? { gainDb: 0, phaseDeg: 0 }
      : { gainDb: (2 * rng.next() - 1) * gainDb, phaseDeg: (2 * rng.next() - 1) * phaseDeg },
  );
}

/** A float32 PCM WAV (format 3) of the given channels, interleaved. */
export function float32Wav(channels: Float32Array[], sampleRate: number): Buffer {
  const m = channels.length;
  const n = channels[0].length;
  const dataBytes = n * m * 4;
  const out = Buffer.alloc(44 + dataBytes);
  out.write('RIFF', 0, 'latin1');
  out.writeUInt32LE(36 + dataBytes, 4);
  out.write('WAVEfmt ', 8, 'latin1');
  out.writeUInt32LE(16, 16);
  out.writeUInt16LE(3, 20);
  out.writeUInt16LE(m, 22);
  out.writeUInt32LE(sampleRate, 24);
  out.writeUInt32LE(sampleRate * m * 4, 28);
  out.writeUInt16LE(m * 4, 32);
  out.writeUInt16LE(32, 34);
  out.write('data', 36, 'latin1');
  out.writeUInt32LE(dataBytes, 40);
  for (let i = 0; i < n; i++) for (let c = 0; c < m; c++) out.writeFloatLE(channels[c][i], 44 + (i * m + c) * 4);
  return out;
}

/** Every second channel (elements 2, 4, …) one sample late: y[n] = x[n − 1], the first sample 0. */
export function oddChannelsLate(channels: Float32Array[]): Float32Array[] {
  return channels.map((x, c) => {
    if (c % 2 === 0) return x;
    const y = new Float32Array(x.length);
    y.set(x.subarray(0, x.length - 1), 1);
    return y;
  });
}

/**
 * Stochastic CRB (Stoica & Nehorai 1990, docs/conventions.md §5) of an array whose known
 * element gains are part of the steering vector, a_m = g_m·exp(j·2π·d·m·sin θ): the bound
 * of the true array for uncorrelated sources. Degrees, one per source.
 */
export function crbWithGains(o: {
  elements: number;
  spacingWavelengths: number;
  bearingsDeg: number[];
  powers: number[];
  noisePower: number;
  snapshots: number;
  states: ElementGainState[];
}): number[] {
  const m = o.elements;
  const k = o.bearingsDeg.length;
  const g = complexGains(o.states);
  const a = zeros(m, k);
  const dd = zeros(m, k);
  o.bearingsDeg.forEach((b, c) => {
    const th = (b * Math.PI) / 180;
    const mu = 2 * Math.PI * o.spacingWavelengths * Math.sin(th);
    const dmu = 2 * Math.PI * o.spacingWavelengths * Math.cos(th);
    for (let i = 0; i < m; i++) {
      const er = Math.cos(mu * i);
      const ei = Math.sin(mu * i);
      const ar = g.re[i] * er - g.im[i] * ei;
      const ai = g.re[i] * ei + g.im[i] * er;
      a.re[i * k + c] = ar;
      a.im[i * k + c] = ai;
      // ∂a/∂θ = j·dμ·m·a
      dd.re[i * k + c] = -dmu * i * ai;
      dd.im[i * k + c] = dmu * i * ar;
    }
  });
  const p = zeros(k, k);
  o.powers.forEach((v, i) => (p.re[i * k + i] = v));
  const apah = multiply(multiply(a, p), conjugateTranspose(a));
  for (let i = 0; i < m; i++) apah.re[i * m + i] += o.noisePower;
  const rinv = inverse(apah);
  const aha = multiplyConjugateTransposeLeft(a, a);
  const proj = multiply(multiply(a, inverse(aha)), conjugateTranspose(a));
  const perp = zeros(m, m);
  for (let i = 0; i < m * m; i++) {
    perp.re[i] = -proj.re[i];
    perp.im[i] = -proj.im[i];
  }
  for (let i = 0; i < m; i++) perp.re[i * m + i] += 1;
  const left = multiplyConjugateTransposeLeft(dd, multiply(perp, dd));
  const right = multiply(multiply(p, multiplyConjugateTransposeLeft(a, multiply(rinv, a))), p);
  // Re[(left) ⊙ (right)ᵀ], K × K real; invert (K ≤ 2 here via the general complex inverse).
  const h = zeros(k, k);
  for (let i = 0; i < k; i++)
    for (let j = 0; j < k; j++) {
      const lr = left.re[i * k + j];
      const li = left.im[i * k + j];
      const rr = right.re[j * k + i];
      const ri = right.im[j * k + i];
      h.re[i * k + j] = lr * rr - li * ri;
    }
  const hinv = inverse(h);
  const scale = o.noisePower / (2 * o.snapshots);
  return o.bearingsDeg.map((_, i) => (Math.sqrt(scale * hinv.re[i * k + i]) * 180) / Math.PI);
}

/** CSV text of N × M rows, one snapshot per line, cells `a+bj` (docs/conventions.md §6), full precision. */
export function csvOf(rows: ComplexMatrix): Buffer {
  const lines: string[] = [];
  for (let n = 0; n < rows.rows; n++) {
    const cells: string[] = [];
    for (let m = 0; m < rows.cols; m++) {
      const re = rows.re[n * rows.cols + m];
      const im = rows.im[n * rows.cols + m];
      cells.push(`${re}${im < 0 ? '-' : '+'}${Math.abs(im)}j`);
    }
    lines.push(cells.join(','));
  }
  return Buffer.from(lines.join('\n') + '\n');
}
