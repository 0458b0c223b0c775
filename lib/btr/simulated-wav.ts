/**
 * Writes a simulated broadband recording (lib/doa/wideband BroadbandSimulator:
 * time-domain fractional delays) as a 16-bit PCM multichannel WAV, rendering
 * and writing one second at a time, so a long recording is never held whole.
 * Samples are in full-scale units (±1 ↔ ±32767) and clipped there; keep the
 * source and noise RMS well below 1. Used by the demo seed and the API tests.
 */
import fs from 'node:fs';
import { BroadbandSimulator, type BroadbandSimulationOptions } from '../doa/wideband';

export function wavHeader(channels: number, sampleRate: number, samplesPerChannel: number): Buffer {
  const dataBytes = samplesPerChannel * channels * 2;
  const h = Buffer.alloc(44);
  h.write('RIFF', 0, 'ascii');
  h.writeUInt32LE(36 + dataBytes, 4);
  h.write('WAVE', 8, 'ascii');
  h.write('fmt ', 12, 'ascii');
  h.writeUInt32LE(16, 16);
  h.writeUInt16LE(1, 20); // PCM
  h.writeUInt16LE(channels, 22);
  h.writeUInt32LE(sampleRate, 24);
  h.writeUInt32LE(sampleRate * channels * 2, 28);
  h.writeUInt16LE(channels * 2, 32);
  h.writeUInt16LE(16, 34);
  h.write('data', 36, 'ascii');
  h.writeUInt32LE(dataBytes, 40);
  return h;
}

/** Renders the simulation into `file` (16-bit PCM WAV); returns its size in bytes. */
export async function writeSimulatedWav(file: string, options: BroadbandSimulationOptions): Promise<number> {
  const sim = new BroadbandSimulator(options);
  const m = options.elements;
  const total = sim.samplesPerChannel;
  const fs_ = options.sampleRate;
  const chunk = Math.max(1, Math.round(fs_));
  const out = Array.from({ length: m }, () => new Float32Array(chunk));
  const fh = await fs.promises.open(file, 'w');
  try {
    await fh.write(wavHeader(m, fs_, total));
    for (let s = 0; s < total; s += chunk) {
      const n = Math.min(chunk, total - s);
      sim.render(s, n, out, 0);
      const buf = Buffer.alloc(n * m * 2);
      for (let i = 0; i < n; i++)
        for (let c = 0; c < m; c++) {
          const v = Math.max(-32767, Math.min(32767, Math.round(out[c][i] * 32767)));
          buf.writeInt16LE(v, 2 * (i * m + c));
        }
      await fh.write(buf);
    }
  } finally {
    await fh.close();
  }
  return 44 + total * m * 2;
}
