import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { stochasticCrb } from '@/lib/doa/bounds';
import { openTimeSeries } from '@/lib/datasets/time-series';
import { DatasetError } from '@/lib/datasets/errors';
import {
  bearingAt,
  bearingTimeRecord,
  binFisherInformation,
  decimateImage,
  defaultMergeDeg,
  joinBlockRanges,
  kalataBeta,
  memorySampleSource,
  planWideband,
  simulateBroadband,
  trackBearings,
  widebandCrb,
  WidebandInputError,
  type BroadbandSource,
  type WidebandOptions,
} from '@/lib/doa/wideband';

const FIXTURES = path.join(__dirname, '../../../fixtures');

interface Reference {
  versions: Record<string, string>;
  sampleRate: number;
  elements: number;
  spacingM: number;
  propagationSpeedMps: number;
  bearingsDeg: number[];
  settings: {
    blockSeconds: number;
    blockOverlap: number;
    fftLength: number;
    hop: number;
    window: 'hann';
    band: { lowHz: number; highHz: number };
    sourceCount: number;
    grid: { startDeg: number; stepDeg: number; count: number };
  };
  bins: number[];
  blocks: { startS: number; endS: number; frames: number }[];
  levelsDb: Record<'music' | 'mvdr' | 'bartlett', number[][]>;
}
const reference = JSON.parse(readFileSync(path.join(FIXTURES, 'wideband/reference.json'), 'utf8')) as Reference;
const wavPath = path.join(FIXTURES, 'wideband/two-sources-m6.wav');

function fixtureOptions(method: WidebandOptions['method']): WidebandOptions {
  const s = reference.settings;
  return {
    elements: reference.elements,
    spacingM: reference.spacingM,
    propagationSpeedMps: reference.propagationSpeedMps,
    band: s.band,
    blockSeconds: s.blockSeconds,
    blockOverlap: s.blockOverlap,
    fftLength: s.fftLength,
    hop: s.hop,
    window: s.window,
    method,
    sourceCount: s.sourceCount,
    grid: s.grid,
    bearingEstimator: 'spectrum-peaks',
  };
}

describe('wideband spectrum against scipy.signal.stft (fixtures/wideband/generate.py)', () => {
  for (const method of ['music', 'mvdr', 'bartlett'] as const) {
    it(`${method}: every block's spectrum equals the numpy/scipy reference within 1e-8 dB`, async () => {
      const source = await openTimeSeries({ path: wavPath });
      const rows: Float64Array[] = [];
      const record = await bearingTimeRecord(source, fixtureOptions(method), {
        onBlock: (_b, analysis) => rows.push(analysis.spectrum),
      });
      expect(record.blocks.map((b) => [b.startS, b.endS])).toEqual(reference.blocks.map((b) => [b.startS, b.endS]));
      expect(record.framesPerBlock).toBe(reference.blocks[0].frames);
      expect(record.bins.count).toBe(reference.bins.length);
      let worst = 0;
      rows.forEach((row, b) => {
        const ref = reference.levelsDb[method][b];
        expect(row.length).toBe(ref.length);
        for (let i = 0; i < row.length; i++) worst = Math.max(worst, Math.abs(10 * Math.log10(row[i]) - ref[i]));
      });
      // Double-precision agreement: the EVD/inverse differ from LAPACK's only by rounding.
      expect(worst).toBeLessThan(1e-8);
      // The Float32 image rows hold the same values to float32 precision.
      const img = record.image.levelsDb;
      for (let i = 0; i < reference.settings.grid.count; i++) {
        expect(Math.abs(img[i] - reference.levelsDb[method][0][i])).toBeLessThan(1e-4);
      }
    });
  }

  it('decimates the image for display by group maxima (consistency check)', async () => {
    const source = await openTimeSeries({ path: wavPath });
    const record = await bearingTimeRecord(source, fixtureOptions('music'));
    const small = decimateImage(record, 2, 10);
    expect(small.levelsDb).toHaveLength(2);
    expect(small.levelsDb[0]).toHaveLength(10);
    expect(small.bearingsDeg).toHaveLength(10);
    // Blocks 0–2 of 5 form the first row group (edge round(5/2) = 3); grid points 0–35 of 361
    // (edge round(361/10) = 36) the first column group.
    const count = record.image.count;
    let best = -Infinity;
    for (const b of [0, 1, 2]) for (let i = 0; i < 36; i++) best = Math.max(best, record.image.levelsDb[b * count + i]);
    expect(small.levelsDb[0][0]).toBe(best);
    expect(small.timesS[0]).toBeCloseTo(0.25 * (0 + 1 + 1 + 2), 12);
    // The global maximum survives.
    const all = Math.max(...record.image.levelsDb);
    expect(Math.max(...small.levelsDb.flat())).toBe(all);
  });

  it('a block range of a seeking source gives the same blocks and rows as the whole record (consistency check)', async () => {
    const whole = await bearingTimeRecord(await openTimeSeries({ path: wavPath }), fixtureOptions('music'));
    const part = await bearingTimeRecord(await openTimeSeries({ path: wavPath }), fixtureOptions('music'), {
      blockRange: { first: 2, count: 3 },
    });
    expect(part.blocks).toEqual(whole.blocks.slice(2));
    const count = whole.image.count;
    expect(Array.from(part.image.levelsDb)).toEqual(Array.from(whole.image.levelsDb.subarray(2 * count)));
    await expect(
      bearingTimeRecord(await openTimeSeries({ path: wavPath }), fixtureOptions('music'), {
        blockRange: { first: 4, count: 2 },
      }),
    ).rejects.toMatchObject({ field: 'blockRange' });
  });

  it('finds the generator’s two bearings (frequency-domain delays in numpy, docs/conventions.md §9 sign)', async () => {
    const source = await openTimeSeries({ path: wavPath });
    const record = await bearingTimeRecord(source, { ...fixtureOptions('music'), bearingEstimator: 'per-bin-music' });
    for (const block of record.blocks) {
      expect(block.bearingsDeg).toHaveLength(2);
      block.bearingsDeg.forEach((b, k) => expect(Math.abs(b - reference.bearingsDeg[k])).toBeLessThan(0.5));
    }
  });
});

describe('wideband CRB (crb.ts)', () => {
  it('one bin equals the narrowband stochastic CRB of bounds.ts (consistency check)', () => {
    const out = widebandCrb({
      elements: 10,
      binSpacing: [0.4],
      bearingsDeg: [-12, 20],
      powers: [[2, 0.5]],
      noisePowers: [1],
      snapshots: 50,
    });
    const ref = stochasticCrb({
      elements: 10,
      spacingWavelengths: 0.4,
      bearingsDeg: [-12, 20],
      sourcePowers: [2, 0.5],
      noisePower: 1,
      snapshots: 50,
    });
    out.stdDeg.forEach((s, k) => expect(s / ref.stdDeg[k] - 1).toBeCloseTo(0, 10));
  });

  it('one source: the bins add their closed-form informations (docs/references.md §5 single-source CRB)', () => {
    const m = 8;
    const theta = 25;
    const n = 30;
    const spacings = [0.2, 0.3, 0.45];
    const snrs = [0.5, 1, 4];
    let info = 0;
    spacings.forEach((d, f) => {
      const snr = snrs[f];
      const det = 6 / (n * snr * m * (m * m - 1) * (2 * Math.PI * d * Math.cos((theta * Math.PI) / 180)) ** 2);
      info += 1 / (det * (1 + 1 / (m * snr)));
    });
    const expected = Math.sqrt(1 / info) * (180 / Math.PI);
    const out = widebandCrb({
      elements: m,
      binSpacing: spacings,
      bearingsDeg: [theta],
      powers: snrs.map((p) => [p]),
      noisePowers: [1, 1, 1],
      snapshots: n,
      redundancy: 1,
    });
    expect(out.stdDeg[0] / expected - 1).toBeCloseTo(0, 10);
    // η scales the variance.
    const eta = widebandCrb({
      elements: m,
      binSpacing: spacings,
      bearingsDeg: [theta],
      powers: snrs.map((p) => [p]),
      noisePowers: [1, 1, 1],
      snapshots: n,
      redundancy: 2,
    });
    expect(eta.stdDeg[0] / (expected * Math.SQRT2) - 1).toBeCloseTo(0, 10);
  });

  it('a source with no power in any bin has an infinite bound; an aliased pair makes a bin drop out', () => {
    const out = widebandCrb({
      elements: 6,
      binSpacing: [0.3, 0.4],
      bearingsDeg: [-10, 30],
      powers: [
        [1, 0],
        [1, 0],
      ],
      noisePowers: [1, 1],
      snapshots: 20,
    });
    expect(Number.isFinite(out.stdDeg[0])).toBe(true);
    expect(out.stdDeg[1]).toBe(Infinity);
    // d = 1: sin θ = ±0.5 share an electrical angle (grating lobe): no information from that bin.
    expect(binFisherInformation(6, 1, [Math.asin(-0.5), Math.asin(0.5)], [1, 1], 1, 20)).toBeNull();
  });
});

// ---------------------------------------------------------------- simulated moving sources
const C = 1500;
const FS = 8000;
const M = 8;
const D = C / (2 * 2000); // half a wavelength at 2 kHz

describe('broadband simulator (time-domain fractional delays)', () => {
  it('a single static source comes back at its bearing with the docs/conventions.md §9 sign (noise-free, 0.01°)', async () => {
    for (const bearing of [-35, 0, 12.5]) {
      const ch = simulateBroadband({
        elements: M,
        spacingM: D,
        propagationSpeedMps: C,
        sampleRate: FS,
        durationS: 2,
        sources: [{ trajectory: [{ tS: 0, bearingDeg: bearing }], rms: 1, bandHz: [300, 2300] }],
        noiseRms: 0,
        seed: 9,
      });
      const rec = await bearingTimeRecord(memorySampleSource(ch, FS), {
        elements: M,
        spacingM: D,
        propagationSpeedMps: C,
        band: { lowHz: 500, highHz: 2000 },
        blockSeconds: 1,
        blockOverlap: 0.5,
        fftLength: 256,
        method: 'music',
        sourceCount: 1,
      });
      for (const b of rec.blocks) expect(Math.abs(b.bearingsDeg[0] - bearing)).toBeLessThan(0.01);
    }
  });

  it('renders the same samples whatever the chunking (seeded)', () => {
    const opts = {
      elements: 3,
      spacingM: D,
      propagationSpeedMps: C,
      sampleRate: FS,
      durationS: 0.25,
      sources: [{ trajectory: [{ tS: 0, bearingDeg: 10 }], rms: 1, bandHz: [300, 2300] as [number, number] }],
      noiseRms: 0.5,
      seed: 4,
    };
    const a = simulateBroadband(opts);
    const b = simulateBroadband(opts);
    expect(Array.from(a[2])).toEqual(Array.from(b[2]));
  });
});

describe('per-block bearings of moving sources against the wideband CRB', () => {
  // Two sources on linear trajectories, well apart; rectangular window with hop = FFT length and
  // no block overlap, where the STFT cells are independent and the summed Fisher information is
  // the asymptotic bound (η = 1). Judged by RMSE over blocks ≤ 1.5 × √(mean CRB) per source.
  const sources: BroadbandSource[] = [
    {
      trajectory: [
        { tS: 0, bearingDeg: -30 },
        { tS: 30, bearingDeg: -18 },
      ],
      rms: 1,
      bandHz: [300, 2300],
    },
    {
      trajectory: [
        { tS: 0, bearingDeg: 35 },
        { tS: 30, bearingDeg: 26 },
      ],
      rms: 1,
      bandHz: [300, 2300],
    },
  ];
  const noiseRms = 3;
  let channels: Float32Array[];
  beforeAll(() => {
    channels = simulateBroadband({
      elements: M,
      spacingM: D,
      propagationSpeedMps: C,
      sampleRate: FS,
      durationS: 30,
      sources,
      noiseRms,
      seed: 21,
    });
  });
  const base: WidebandOptions = {
    elements: M,
    spacingM: D,
    propagationSpeedMps: C,
    band: { lowHz: 500, highHz: 2000 },
    blockSeconds: 1,
    blockOverlap: 0,
    fftLength: 256,
    window: 'rectangular',
    method: 'music',
    sourceCount: 2,
  };

  for (const estimator of ['per-bin-music', 'spectrum-peaks', 'per-bin-root-music'] as const) {
    it(`${estimator}: RMSE ≤ 1.5 × √CRB per source`, async () => {
      const rec = await bearingTimeRecord(memorySampleSource(channels, FS), { ...base, bearingEstimator: estimator });
      expect(rec.crbRedundancy).toBe(1);
      const plan = planWideband(base, { sampleRate: FS, channels: M });
      // Per-bin SNR of the simulation: flat source PSD rms²/(2300 − 300 Hz) over white noise noiseRms²/(fs/2).
      const snr = 1 / 2000 / (noiseRms ** 2 / (FS / 2));
      const se = [0, 0];
      const crb = [0, 0];
      for (const b of rec.blocks) {
        const truth = sources.map((s) => bearingAt(s.trajectory, 0.5 * (b.startS + b.endS)));
        const bound = widebandCrb({
          elements: M,
          binSpacing: plan.binSpacing,
          bearingsDeg: truth,
          powers: Array.from(plan.binSpacing, () => [snr, snr]),
          noisePowers: Array.from(plan.binSpacing, () => 1),
          snapshots: plan.framesPerBlock,
        });
        for (let k = 0; k < 2; k++) {
          se[k] += (b.bearingsDeg[k] - truth[k]) ** 2;
          crb[k] += bound.stdDeg[k] ** 2;
        }
      }
      const n = rec.blocks.length;
      expect(n).toBe(30);
      for (let k = 0; k < 2; k++) {
        const rmse = Math.sqrt(se[k] / n);
        const bound = Math.sqrt(crb[k] / n);
        expect(rmse).toBeLessThanOrEqual(1.5 * bound);
        // and not implausibly far below it (a bug that leaks the truth would show here)
        expect(rmse).toBeGreaterThan(0.5 * bound);
      }
    });
  }
});

describe('tracks from a simulated recording: crossing contacts and a late one', () => {
  // 16 elements. A (+1.5°/s) crosses B (−1°/s) at 0° near 20 s; C is on from 10 s to 28 s.
  // MDL picks the count per bin (median over bins).
  const sources: BroadbandSource[] = [
    {
      trajectory: [
        { tS: 0, bearingDeg: -30 },
        { tS: 40, bearingDeg: 30 },
      ],
      rms: 1,
      bandHz: [300, 2300],
    },
    {
      trajectory: [
        { tS: 0, bearingDeg: 20 },
        { tS: 40, bearingDeg: -20 },
      ],
      rms: 1,
      bandHz: [300, 2300],
    },
    {
      trajectory: [
        { tS: 0, bearingDeg: 52 },
        { tS: 40, bearingDeg: 46 },
      ],
      rms: 1,
      bandHz: [300, 2300],
      startS: 10,
      endS: 28,
    },
  ];
  let record: Awaited<ReturnType<typeof bearingTimeRecord>>;
  let channels: Float32Array[];
  const options: WidebandOptions = {
    elements: 16,
    spacingM: D,
    propagationSpeedMps: C,
    band: { lowHz: 500, highHz: 2000 },
    blockSeconds: 1,
    blockOverlap: 0.5,
    fftLength: 256,
    method: 'music',
  };
  beforeAll(async () => {
    channels = simulateBroadband({
      elements: 16,
      spacingM: D,
      propagationSpeedMps: C,
      sampleRate: FS,
      durationS: 40,
      sources,
      noiseRms: 1.5,
      seed: 33,
    });
    record = await bearingTimeRecord(memorySampleSource(channels, FS), options);
  });

  it('two workers’ block ranges, joined, give the same blocks, image and tracks as one pass (consistency check)', async () => {
    const total = record.blocks.length;
    const plan = planWideband(options, { sampleRate: FS, channels: 16 });
    for (const split of [Math.round(total / 2), 1, total - 1]) {
      const shares = await Promise.all(
        [
          { first: 0, count: split },
          { first: split, count: total - split },
        ].map((blockRange) =>
          bearingTimeRecord(memorySampleSource(channels, FS), options, { blockRange, yieldEvery: 0 }),
        ),
      );
      // Shares handed over in the order they finished (here reversed) still join in block order.
      const joined = joinBlockRanges(
        shares.reverse().map((r) => ({ blocks: r.blocks, levelsDb: r.image.levelsDb })),
        plan,
      );
      expect(joined.blocks).toEqual(record.blocks);
      expect(Buffer.from(joined.levelsDb.buffer).equals(Buffer.from(record.image.levelsDb.buffer))).toBe(true);
      expect(joined.tracks).toEqual(record.tracks);
    }
    // A boundary block analysed by both shares is refused, not joined twice.
    const dup = { blocks: record.blocks.slice(0, 3), levelsDb: record.image.levelsDb.slice(0, 3 * record.image.count) };
    const rest = { blocks: record.blocks.slice(2), levelsDb: record.image.levelsDb.slice(2 * record.image.count) };
    expect(() => joinBlockRanges([dup, rest], plan)).toThrow(/do not tile/);
  });

  it('recovers three tracks with start and end within one block of the truth', () => {
    expect(record.tracks).toHaveLength(3);
    const late = record.tracks.find((t) => Math.abs(t.points[0].measuredDeg - 52) < 3);
    expect(late).toBeDefined();
    expect(Math.abs(late!.startS - 10)).toBeLessThanOrEqual(1);
    expect(Math.abs(late!.endS - 28)).toBeLessThanOrEqual(1);
    for (const t of record.tracks.filter((x) => x !== late)) {
      expect(t.startS).toBeLessThanOrEqual(1);
      expect(t.endS).toBeGreaterThanOrEqual(39);
    }
  });

  it('A and B keep their identities through the crossing; mean rates within 0.05°/s', () => {
    const a = record.tracks.find((t) => t.points[0].measuredDeg < -25)!;
    const b = record.tracks.find((t) => Math.abs(t.points[0].measuredDeg - 20) < 3)!;
    expect(a).toBeDefined();
    expect(b).toBeDefined();
    expect(Math.abs(a.meanRateDegPerS - 1.5)).toBeLessThan(0.05);
    expect(Math.abs(b.meanRateDegPerS + 1)).toBeLessThan(0.05);
    // Every point lies on its own trajectory (within 2°), before and after the crossing.
    for (const p of a.points) expect(Math.abs(p.bearingDeg - bearingAt(sources[0].trajectory, p.tS))).toBeLessThan(2);
    for (const p of b.points) expect(Math.abs(p.bearingDeg - bearingAt(sources[1].trajectory, p.tS))).toBeLessThan(2);
    expect(a.points.some((p) => p.tS < 15) && a.points.some((p) => p.tS > 25)).toBe(true);
    expect(b.points.some((p) => p.tS < 15) && b.points.some((p) => p.tS > 25)).toBe(true);
  });
});

describe('α–β tracker (tracker.ts)', () => {
  it('a record merges tracks closer than the broadside Rayleigh gap asin(1/(M·d)) of docs/conventions.md §5 at the middle bin', () => {
    const plan = planWideband(
      { ...fixtureOptions('music') },
      { sampleRate: reference.sampleRate, channels: reference.elements },
    );
    const d = plan.binSpacing[plan.binSpacing.length >> 1];
    expect(defaultMergeDeg(plan)).toBeCloseTo((Math.asin(1 / (reference.elements * d)) * 180) / Math.PI, 12);
  });

  it("uses Kalata's steady-state relation β = 2(2 − α) − 4√(1 − α) by default (Kalata 1984)", () => {
    expect(kalataBeta(0.5)).toBeCloseTo(3 - 2 * Math.SQRT2, 12);
  });

  it('keeps identities of two crossing straight tracks whose peaks merge for three blocks', () => {
    const blocks = [];
    for (let i = 0; i < 40; i++) {
      const t = i;
      const a = -20 + t;
      const b = 20 - t;
      const merged = Math.abs(a - b) < 3;
      blocks.push({ tS: t, bearingsDeg: merged ? [0.5 * (a + b)] : [Math.min(a, b), Math.max(a, b)] });
    }
    const tracks = trackBearings(blocks);
    expect(tracks).toHaveLength(2);
    const up = tracks.find((t) => t.points[0].measuredDeg < 0)!;
    expect(up.meanRateDegPerS).toBeCloseTo(1, 1);
    expect(up.points[up.points.length - 1].measuredDeg).toBeCloseTo(19, 6);
  });
});

describe('bad recordings and options get errors that name the parameter', () => {
  let dir: string;
  beforeAll(() => {
    dir = mkdtempSync(path.join(tmpdir(), 'wideband-'));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('a mono WAV: 422 too-few-channels', async () => {
    await expect(
      openTimeSeries({ path: path.join(FIXTURES, 'datasets/hostile/one-channel.wav') }),
    ).rejects.toMatchObject({
      status: 422,
      code: 'too-few-channels',
    });
  });

  it('a zero-length WAV: 422 no-snapshots', async () => {
    await expect(
      openTimeSeries({ path: path.join(FIXTURES, 'datasets/hostile/zero-length.wav') }),
    ).rejects.toMatchObject({
      status: 422,
      code: 'no-snapshots',
    });
  });

  it('a truncated WAV: 422 truncated, saying the file is cut short', async () => {
    const bytes = readFileSync(wavPath);
    const cut = path.join(dir, 'cut.wav');
    writeFileSync(cut, bytes.subarray(0, bytes.length - 1000));
    const err = await openTimeSeries({ path: cut }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(DatasetError);
    expect(err).toMatchObject({ status: 422, code: 'truncated' });
    expect((err as Error).message).toMatch(/cut short/);
  });

  it('an NPY recording (float32, samples × channels) streams the same values; without sampleRate it is refused', async () => {
    const s = 300;
    const header = "{'descr': '<f4', 'fortran_order': False, 'shape': (300, 2), }";
    const pad = 64 - ((10 + header.length + 1) % 64);
    const head = Buffer.concat([
      Buffer.from([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0]),
      Buffer.from([(header.length + pad + 1) & 0xff, (header.length + pad + 1) >> 8]),
      Buffer.from(header + ' '.repeat(pad) + '\n', 'latin1'),
    ]);
    const data = new Float32Array(2 * s).map((_, i) => (i % 2 === 0 ? i : -i) / 1000);
    const file = path.join(dir, 'rec.npy');
    writeFileSync(file, Buffer.concat([head, Buffer.from(data.buffer)]));
    await expect(openTimeSeries({ path: file })).rejects.toMatchObject({ status: 422, code: 'bad-option' });
    const src = await openTimeSeries({ path: file, sampleRate: 1000 });
    const out = [new Float32Array(s), new Float32Array(s)];
    expect(await src.read(out, 0, s)).toBe(s);
    expect(out[0][7]).toBeCloseTo(14 / 1000, 6);
    expect(out[1][7]).toBeCloseTo(-15 / 1000, 6);
    await src.close();
  });

  const rec = { sampleRate: reference.sampleRate, channels: reference.elements };
  const cases: [string, Partial<WidebandOptions>, { sampleRate: number; channels: number }, string, RegExp][] = [
    ['wrong channel count', { elements: 8 }, rec, 'elements', /8 elements.*6 channels/],
    ['mono recording', { elements: 2 }, { ...rec, channels: 1 }, 'channels', /1 channel/],
    ['band above Nyquist', { band: { lowHz: 1000, highHz: 4500 } }, rec, 'band.highHz', /Nyquist frequency 4000 Hz/],
    ['zero-length block', { blockSeconds: 0 }, rec, 'blockSeconds', /more than 0 s/],
    ['block shorter than one FFT frame', { blockSeconds: 0.01 }, rec, 'blockSeconds', /shorter than one FFT frame/],
    ['overlap of 1', { blockOverlap: 1 }, rec, 'blockOverlap', /fraction/],
    ['empty band', { band: { lowHz: 1001, highHz: 1030 } }, rec, 'band', /holds no FFT bin/],
    ['band wholly above half a wavelength', { band: { lowHz: 3000, highHz: 3900 } }, rec, 'band', /half a wavelength/],
    ['FFT length not a power of two', { fftLength: 1000 }, rec, 'fftLength', /power of two/],
    ['source count ≥ elements', { sourceCount: 6 }, rec, 'sourceCount', /fewer than the 6 elements/],
    [
      'per-bin estimator with Bartlett',
      { method: 'bartlett', bearingEstimator: 'per-bin-music' },
      rec,
      'bearingEstimator',
      /needs method music/,
    ],
  ];
  for (const [name, over, recording, field, says] of cases) {
    it(`${name}: WidebandInputError on ${field}`, () => {
      let err: unknown;
      try {
        planWideband({ ...fixtureOptions('music'), ...over }, recording);
      } catch (e) {
        err = e;
      }
      expect(err).toBeInstanceOf(WidebandInputError);
      expect((err as WidebandInputError).field).toBe(field);
      expect((err as Error).message).toMatch(says);
    });
  }

  it('a recording shorter than one block is refused on blockSeconds', async () => {
    const ch = [new Float32Array(100), new Float32Array(100)];
    await expect(
      bearingTimeRecord(memorySampleSource(ch, 1000), {
        ...fixtureOptions('music'),
        elements: 2,
        sourceCount: 1,
        band: { lowHz: 100, highHz: 400 },
      }),
    ).rejects.toMatchObject({ field: 'blockSeconds' });
  });

  it('gratingLobes include keeps and counts the bins above half a wavelength', () => {
    const plan = planWideband(
      { ...fixtureOptions('music'), band: { lowHz: 1500, highHz: 3000 }, gratingLobes: 'include' },
      rec,
    );
    const above = Array.from(plan.binSpacing).filter((d) => d > 0.5).length;
    expect(plan.gratingLobeBins).toBe(above);
    expect(above).toBeGreaterThan(0);
    const excluded = planWideband({ ...fixtureOptions('music'), band: { lowHz: 1500, highHz: 3000 } }, rec);
    expect(excluded.excludedBins).toBe(above);
    expect(excluded.bins.length + above).toBe(plan.bins.length);
  });
});
