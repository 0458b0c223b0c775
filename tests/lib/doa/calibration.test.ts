/**
 * Calibration from reference recordings (lib/doa/calibration): accuracy against the
 * simulated truth, Monte Carlo bearings after calibration against the stochastic CRB
 * (docs/references.md §9, §12), the one-sample-late wiring fault in a WAV, and several
 * references with image-source multipath against one.
 */
import { describe, expect, it } from 'vitest';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { estimateBearings, stochasticCrb, type ComplexMatrix } from '@/lib/doa';
import { simulateBroadband } from '@/lib/doa/wideband/simulate';
import { parseSnapshotFile } from '@/lib/datasets';
import {
  applyElementGains,
  calibrate,
  CalibrationInputError,
  complexGains,
  type ElementGainState,
} from '@/lib/doa/calibration';
import { crbWithGains, float32Wav, oddChannelsLate, randomStates, simulateReference } from './calibration-helpers';

const D = 0.5;

function calibrated(rows: ComplexMatrix, states: ElementGainState[]): ComplexMatrix {
  return applyElementGains(rows, complexGains(states), 'snapshots-by-elements');
}

function wrap(x: number): number {
  return ((((x + 180) % 360) + 360) % 360) - 180;
}

describe('known-bearings calibration: simulated ±2 dB / ±20° errors', () => {
  const m = 10;
  const truth = randomStates(m, 7);

  it('one reference, one source: every element within 3σ of the truth (jackknife σ)', () => {
    const rows = simulateReference({
      elements: m,
      spacingWavelengths: D,
      bearingsDeg: [20],
      noisePower: 0.01,
      snapshots: 2000,
      seed: 3,
      states: truth,
    });
    const { states, report } = calibrate([{ rows, bearingsDeg: [20] }], { spacingWavelengths: D });
    expect(states[0]).toEqual({ gainDb: 0, phaseDeg: 0 });
    for (let i = 1; i < m; i++) {
      const e = report.elements[i];
      expect(Math.abs(e.gainDb - truth[i].gainDb)).toBeLessThanOrEqual(3 * e.gainStdDb);
      expect(Math.abs(wrap(e.phaseDeg - truth[i].phaseDeg))).toBeLessThanOrEqual(3 * e.phaseStdDeg);
      expect(e.gainStdDb).toBeGreaterThan(0);
    }
    expect(report.residual).toBeLessThan(report.residualUncalibrated);
    expect(report.verdict.status).toBe('supported');
  });

  it('one reference with three sources, and the self-calibration from rough bearings: within 3σ', () => {
    const bearings = [-35, 5, 40];
    const rows = simulateReference({
      elements: m,
      spacingWavelengths: D,
      bearingsDeg: bearings,
      noisePower: 0.01,
      snapshots: 4000,
      seed: 11,
      states: truth,
    });
    const known = calibrate([{ rows, bearingsDeg: bearings }], { spacingWavelengths: D });
    for (let i = 1; i < m; i++) {
      const e = known.report.elements[i];
      expect(Math.abs(e.gainDb - truth[i].gainDb)).toBeLessThanOrEqual(3 * e.gainStdDb);
      expect(Math.abs(wrap(e.phaseDeg - truth[i].phaseDeg))).toBeLessThanOrEqual(3 * e.phaseStdDeg);
    }
    // Self-calibration: starting bearings 3° off. The phases are fixed up to a linear ramp
    // (its stated assumption), so compare the truth with its linear phase trend removed.
    const self = calibrate([{ rows, bearingsDeg: [-32, 8, 37] }], {
      spacingWavelengths: D,
      method: 'self-calibration',
    });
    const idx = truth.map((_, i) => i);
    const xm = (m - 1) / 2;
    const ym = truth.reduce((s, t) => s + t.phaseDeg, 0) / m;
    const slope =
      idx.reduce((s, i) => s + (i - xm) * (truth[i].phaseDeg - ym), 0) / idx.reduce((s, i) => s + (i - xm) ** 2, 0);
    for (let i = 1; i < m; i++) {
      const e = self.report.elements[i];
      expect(Math.abs(e.gainDb - truth[i].gainDb)).toBeLessThanOrEqual(3 * e.gainStdDb + 1e-9);
      expect(Math.abs(wrap(e.phaseDeg - (truth[i].phaseDeg - slope * i)))).toBeLessThanOrEqual(
        3 * e.phaseStdDeg + 1e-9,
      );
    }
    expect(self.report.references[0].fittedBearingsDeg).toHaveLength(3);
  });
});

describe('bearings after calibration: seeded Monte Carlo against the stochastic CRB of the true array', () => {
  it('calibrated root-MUSIC RMSE is within 0.85 … 1.15 × √CRB; uncalibrated is biased', () => {
    const m = 8;
    const truth = randomStates(m, 21);
    // Rich references (30 dB SNR, 20 000 snapshots, three positions) so that the calibration's
    // own error is small against the estimate's (common practice for a calibration range).
    const refs = [-40, 0, 35].map((b, i) => ({
      rows: simulateReference({
        elements: m,
        spacingWavelengths: D,
        bearingsDeg: [b],
        noisePower: 0.001,
        snapshots: 20000,
        seed: 100 + i,
        states: truth,
      }),
      bearingsDeg: [b],
    }));
    const { states } = calibrate(refs, { spacingWavelengths: D });
    const bearings = [-12, 21];
    const noisePower = 0.1; // 10 dB per source
    const snapshots = 200;
    // The bound of the true array (its gains in the steering vectors); the ideal array's for comparison.
    const crb = crbWithGains({
      elements: m,
      spacingWavelengths: D,
      bearingsDeg: bearings,
      powers: [1, 1],
      noisePower,
      snapshots,
      states: truth,
    });
    const crbIdeal = stochasticCrb({
      elements: m,
      spacingWavelengths: D,
      bearingsDeg: bearings,
      sourcePowers: [1, 1],
      noisePower,
      snapshots,
    }).stdDeg;
    // Consistency check of the test's bound: with unit gains it is lib/doa's stochastic CRB.
    const unitCrb = crbWithGains({
      elements: m,
      spacingWavelengths: D,
      bearingsDeg: bearings,
      powers: [1, 1],
      noisePower,
      snapshots,
      states: truth.map(() => ({ gainDb: 0, phaseDeg: 0 })),
    });
    unitCrb.forEach((v, k) => expect(v).toBeCloseTo(crbIdeal[k], 10));
    const trials = 400;
    const se = [0, 0];
    const seRaw = [0, 0];
    const meanRaw = [0, 0];
    for (let t = 0; t < trials; t++) {
      const rows = simulateReference({
        elements: m,
        spacingWavelengths: D,
        bearingsDeg: bearings,
        noisePower,
        snapshots,
        seed: 5000 + t,
        states: truth,
      });
      const cal = estimateBearings({
        rows: calibrated(rows, states),
        spacingWavelengths: D,
        method: 'root-music',
        sourceCount: 2,
      });
      const raw = estimateBearings({ rows, spacingWavelengths: D, method: 'root-music', sourceCount: 2 });
      for (let k = 0; k < 2; k++) {
        se[k] += (cal.bearingsDeg[k] - bearings[k]) ** 2;
        seRaw[k] += (raw.bearingsDeg[k] - bearings[k]) ** 2;
        meanRaw[k] += raw.bearingsDeg[k] - bearings[k];
      }
    }
    const ratio = se.map((s, k) => Math.sqrt(s / trials) / crb[k]);
    const ratioRaw = seRaw.map((s, k) => Math.sqrt(s / trials) / crb[k]);
    const bias = meanRaw.map((s) => s / trials);
    console.log(
      `calibrated RMSE/√CRB ${ratio.map((r) => r.toFixed(3)).join(', ')}; uncalibrated ${ratioRaw.map((r) => r.toFixed(2)).join(', ')} (bias ${bias.map((b) => b.toFixed(3)).join(', ')}°, √CRB ${crb.map((c) => c.toFixed(4)).join(', ')}°, ideal array ${Array.from(crbIdeal, (c) => c.toFixed(4)).join(', ')}°)`,
    );
    for (const r of ratio) {
      expect(r).toBeLessThanOrEqual(1.15);
      expect(r).toBeGreaterThanOrEqual(0.85);
    }
    // Uncalibrated: biased by more than 3 standard errors of the mean, and RMSE well above the bound.
    expect(Math.max(...bias.map((b, k) => Math.abs(b) / (crb[k] / Math.sqrt(trials))))).toBeGreaterThan(3);
    expect(Math.max(...ratioRaw)).toBeGreaterThan(1.5);
  });
});

describe('a WAV whose every second channel is one sample late', () => {
  const m = 8;
  const fs = 16000;
  const c = 1500;
  const f = 2000;
  const spacingM = 0.375; // λ/2 at 2 kHz
  const d = (spacingM * f) / c;
  const dir = mkdtempSync(join(tmpdir(), 'steerwise-cal-'));

  async function recording(name: string, bearings: number[], seed: number): Promise<ComplexMatrix> {
    const channels = simulateBroadband({
      elements: m,
      spacingM,
      propagationSpeedMps: c,
      sampleRate: fs,
      durationS: 6,
      sources: bearings.map((b) => ({ trajectory: [{ tS: 0, bearingDeg: b }], rms: 0.1, bandHz: [1000, 3000] })),
      noiseRms: 0.005,
      seed,
      interpolationHalfLength: 8,
      firTaps: 63,
    });
    const path = join(dir, name);
    writeFileSync(path, float32Wav(oddChannelsLate(channels), fs));
    const parsed = await parseSnapshotFile({ path, frequencyHz: f, fftLength: 256 });
    return { rows: parsed.snapshots, cols: parsed.elements, re: parsed.re, im: parsed.im };
  }

  it('is corrected at its analysis frequency: −360°·k/L on elements 2, 4, …, and bearings return', async () => {
    const reference = await recording('reference.wav', [30], 5);
    const { states, report } = calibrate([{ rows: reference, bearingsDeg: [30] }], { spacingWavelengths: d });
    // Bin k = round(f·L/fs) = 32 of L = 256 (docs/conventions.md §6): a one-sample delay is exp(−j·2π·32/256) = −45°.
    const expected = (-360 * 32) / 256;
    for (let i = 0; i < m; i++) {
      expect(Math.abs(wrap(states[i].phaseDeg - (i % 2 ? expected : 0)))).toBeLessThan(1);
      expect(Math.abs(states[i].gainDb)).toBeLessThan(0.2);
    }
    expect(report.verdict.status).toBe('supported');
    const truthBearings = [-20, 10];
    const other = await recording('others.wav', truthBearings, 6);
    const raw = estimateBearings({ rows: other, spacingWavelengths: d, method: 'root-music', sourceCount: 2 });
    const cal = estimateBearings({
      rows: calibrated(other, states),
      spacingWavelengths: d,
      method: 'root-music',
      sourceCount: 2,
    });
    const errRaw = Math.max(...raw.bearingsDeg.map((b, k) => Math.abs(b - truthBearings[k])));
    const errCal = Math.max(...cal.bearingsDeg.map((b, k) => Math.abs(b - truthBearings[k])));
    console.log(
      `one-sample-late WAV: bearing error ${errRaw.toFixed(3)}° uncalibrated, ${errCal.toFixed(3)}° calibrated`,
    );
    expect(errCal).toBeLessThan(0.3);
    expect(errRaw).toBeGreaterThan(0.5);
    expect(errRaw).toBeGreaterThan(10 * errCal);
  });
});

describe('several references with image-source multipath against one reference', () => {
  const m = 10;
  const truth = randomStates(m, 33);
  const refBearings = [-45, -20, 5, 30, 50];
  // One reflecting boundary: each position sees its image at its own bearing and phase.
  const images = refBearings.map((b, r) => ({
    bearingDeg: Math.max(-85, Math.min(85, -0.7 * b + 14)),
    re: 0.3 * Math.cos(1.3 + 2.1 * r),
    im: 0.3 * Math.sin(1.3 + 2.1 * r),
  }));
  const refs = refBearings.map((b, r) => ({
    rows: simulateReference({
      elements: m,
      spacingWavelengths: D,
      bearingsDeg: [b],
      noisePower: 0.001,
      snapshots: 4000,
      seed: 700 + r,
      states: truth,
      images: [images[r]],
    }),
    bearingsDeg: [b],
  }));

  it('the joint fit gives held-out bearings closer to the truth than the first reference alone', () => {
    const single = calibrate([refs[0]], { spacingWavelengths: D });
    const joint = calibrate(refs, { spacingWavelengths: D });
    const heldOut = [-32, -8, 18, 40];
    const err = (states: ElementGainState[]) =>
      heldOut.map((b, i) => {
        const rows = simulateReference({
          elements: m,
          spacingWavelengths: D,
          bearingsDeg: [b],
          noisePower: 0.01,
          snapshots: 2000,
          seed: 900 + i,
          states: truth,
        });
        const est = estimateBearings({
          rows: calibrated(rows, states),
          spacingWavelengths: D,
          method: 'root-music',
          sourceCount: 1,
        });
        return Math.abs(est.bearingsDeg[0] - b);
      });
    const e1 = err(single.states);
    const eJ = err(joint.states);
    const mean = (x: number[]) => x.reduce((s, v) => s + v, 0) / x.length;
    console.log(
      `held-out |error|: one reference ${e1.map((e) => e.toFixed(3)).join(', ')}° (mean ${mean(e1).toFixed(3)}°); joint ${eJ.map((e) => e.toFixed(3)).join(', ')}° (mean ${mean(eJ).toFixed(3)}°)`,
    );
    expect(mean(eJ)).toBeLessThan(0.7 * mean(e1));
    // One reference absorbs its own multipath: its residual is small, so only the joint fit shows it.
    expect(single.report.residual).toBeLessThan(joint.report.residual);
  });

  it('the verdict names a lone reference that disagrees with the others', () => {
    const clean = [-40, -5, 25].map((b, r) => ({
      rows: simulateReference({
        elements: m,
        spacingWavelengths: D,
        bearingsDeg: [b],
        noisePower: 0.001,
        snapshots: 4000,
        seed: 800 + r,
        states: truth,
      }),
      bearingsDeg: [b],
    }));
    const bad = refs[3]; // 30° with a 0.3 reflection
    const all = [clean[0], clean[1], bad, clean[2]];
    const { report } = calibrate(all, { spacingWavelengths: D });
    console.log(
      'χ²/dof per reference:',
      report.references.map((r) => r.consistency!.chiSquarePerDof.toFixed(1)).join(', '),
      'closest agreement:',
      report.references.map((r) => r.closestAgreement!.chiSquarePerDof.toFixed(1)).join(', '),
      report.verdict.messages[0],
    );
    expect(report.verdict.status).toBe('inconsistent');
    expect(report.verdict.flaggedReference).toBe(2);
    expect(report.verdict.supported).toBe(false);
    const good = calibrate(clean, { spacingWavelengths: D });
    expect(good.report.verdict.disagreeing).toEqual([]);
    expect(good.report.verdict.status).toBe('supported');
  });
});

describe('references the data cannot support', () => {
  const m = 8;
  it('refuses a bearing with no signal, a noise-only recording, and too few snapshots', () => {
    const truth = randomStates(m, 2);
    const rows = simulateReference({
      elements: m,
      spacingWavelengths: D,
      bearingsDeg: [25],
      noisePower: 0.01,
      snapshots: 500,
      seed: 4,
      states: truth,
    });
    expect(() => calibrate([{ rows, bearingsDeg: [-50] }], { spacingWavelengths: D })).toThrow(CalibrationInputError);
    expect(() => calibrate([{ rows, bearingsDeg: [-50] }], { spacingWavelengths: D })).toThrow(/no signal at -50°/);
    const noise = simulateReference({
      elements: m,
      spacingWavelengths: D,
      bearingsDeg: [25],
      powers: [0],
      noisePower: 1,
      snapshots: 500,
      seed: 5,
    });
    expect(() => calibrate([{ rows: noise, bearingsDeg: [25] }], { spacingWavelengths: D })).toThrow(
      /0 signal\(s\) above the noise/,
    );
    const short = { ...rows, rows: 5, re: rows.re.subarray(0, 5 * m), im: rows.im.subarray(0, 5 * m) };
    expect(() => calibrate([{ rows: short, bearingsDeg: [25] }], { spacingWavelengths: D })).toThrow(
      /5 snapshots, fewer than its 8 elements/,
    );
    // The true bearing passes.
    expect(calibrate([{ rows, bearingsDeg: [25] }], { spacingWavelengths: D }).report.verdict.status).toBe('supported');
  });
});

describe('the jackknife standard deviations are calibrated', () => {
  it('over 40 seeded arrays and recordings, (estimate − truth)/σ has mean ≈ 0 and std ≈ 1', () => {
    const m = 8;
    const zs: number[] = [];
    for (let s = 0; s < 40; s++) {
      const truth = randomStates(m, 41 + s);
      const rows = simulateReference({
        elements: m,
        spacingWavelengths: D,
        bearingsDeg: [20],
        noisePower: 0.01,
        snapshots: 1000,
        seed: 1 + 100 * s,
        states: truth,
      });
      const { report } = calibrate([{ rows, bearingsDeg: [20] }], { spacingWavelengths: D });
      for (let i = 1; i < m; i++) {
        const e = report.elements[i];
        zs.push((e.gainDb - truth[i].gainDb) / e.gainStdDb);
        zs.push(wrap(e.phaseDeg - truth[i].phaseDeg) / e.phaseStdDeg);
      }
    }
    const mean = zs.reduce((a, b) => a + b, 0) / zs.length;
    const sd = Math.sqrt(zs.reduce((a, b) => a + (b - mean) ** 2, 0) / zs.length);
    const beyond3 = zs.filter((z) => Math.abs(z) > 3).length;
    console.log(`z over ${zs.length} estimates: mean ${mean.toFixed(3)}, std ${sd.toFixed(3)}, beyond 3σ ${beyond3}`);
    // Consistency check of the jackknife (common practice): std within ±15 %, ≤ 1 % beyond 3σ.
    expect(Math.abs(mean)).toBeLessThan(0.15);
    expect(sd).toBeGreaterThan(0.85);
    expect(sd).toBeLessThan(1.15);
    expect(beyond3 / zs.length).toBeLessThanOrEqual(0.01);
  });
});
