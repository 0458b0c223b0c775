/**
 * Narrowband snapshots from multichannel samples by a short-time Fourier
 * transform at one frequency (docs/conventions.md §6).
 *
 * With L the FFT length, fs the sample rate and f the analysis frequency:
 *   bin k = round(f·L/fs)   (Math.round: halves round up);
 *   frame t starts at sample t·hop and only whole frames are used, so
 *   T = floor((S − L)/hop) + 1 frames for S samples per channel;
 *   snapshot t, element m = Σ_{n=0}^{L−1} w[n]·x_m[t·hop + n]·exp(−j2πkn/L).
 * Windows are periodic: hann w[n] = 0.5 − 0.5·cos(2πn/L),
 * hamming w[n] = 0.54 − 0.46·cos(2πn/L), rectangular w[n] = 1.
 * The transform is fft.js's real-input FFT (forward sign exp(−j…)); L must be
 * a power of two, which fft.js requires.
 *
 * Samples are pushed one multichannel sample at a time into a ring buffer of
 * L samples per channel, so memory is O(M·L) besides the T×M output.
 */
import FFT from 'fft.js';
import type { StftWindow } from './types';

export function stftWindow(kind: StftWindow, length: number): Float64Array {
  const w = new Float64Array(length);
  for (let n = 0; n < length; n++) {
    const c = Math.cos((2 * Math.PI * n) / length);
    w[n] = kind === 'hann' ? 0.5 - 0.5 * c : kind === 'hamming' ? 0.54 - 0.46 * c : 1;
  }
  return w;
}

export function stftBin(frequencyHz: number, fftLength: number, sampleRate: number): number {
  return Math.round((frequencyHz * fftLength) / sampleRate);
}

export function stftFrameCount(samples: number, fftLength: number, hop: number): number {
  return samples < fftLength ? 0 : Math.floor((samples - fftLength) / hop) + 1;
}

export class NarrowbandStft {
  readonly re: Float64Array;
  readonly im: Float64Array;
  /** Frames completed so far. */
  frames = 0;
  private readonly ring: Float64Array[];
  private readonly window: Float64Array;
  private readonly fft: FFT;
  private readonly input: Float64Array;
  private readonly output: number[];
  private samples = 0;
  private nextFrameEnd: number;

  constructor(
    private readonly channels: number,
    private readonly fftLength: number,
    private readonly hop: number,
    windowKind: StftWindow,
    private readonly bin: number,
    readonly totalFrames: number,
  ) {
    this.ring = Array.from({ length: channels }, () => new Float64Array(fftLength));
    this.window = stftWindow(windowKind, fftLength);
    this.fft = new FFT(fftLength);
    this.input = new Float64Array(fftLength);
    this.output = this.fft.createComplexArray() as number[];
    this.re = new Float64Array(totalFrames * channels);
    this.im = new Float64Array(totalFrames * channels);
    this.nextFrameEnd = fftLength;
  }

  /** Adds one sample of every channel (`values[c]` for channel c). */
  push(values: Float64Array): void {
    const pos = this.samples % this.fftLength;
    for (let c = 0; c < this.channels; c++) this.ring[c][pos] = values[c];
    this.samples++;
    if (this.samples === this.nextFrameEnd) {
      if (this.frames < this.totalFrames) this.emitFrame();
      this.nextFrameEnd += this.hop;
    }
  }

  private emitFrame(): void {
    const L = this.fftLength;
    const start = this.samples % L; // ring index of the oldest sample of the frame
    const k = this.bin;
    const base = this.frames * this.channels;
    for (let c = 0; c < this.channels; c++) {
      const ring = this.ring[c];
      for (let n = 0; n < L; n++) {
        const idx = start + n;
        this.input[n] = this.window[n] * ring[idx < L ? idx : idx - L];
      }
      this.fft.realTransform(this.output, this.input);
      this.re[base + c] = this.output[2 * k];
      this.im[base + c] = this.output[2 * k + 1];
    }
    this.frames++;
  }
}
