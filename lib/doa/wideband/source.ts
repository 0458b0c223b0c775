/**
 * Streaming multichannel sample input for a bearing–time record.
 *
 * A SampleSource hands out consecutive samples of every channel, in order,
 * into caller-owned Float32Array buffers (channel c = element c), so a
 * recording is never held whole: the record keeps one block (M × B samples as
 * float32) plus the STFT of that block. File readers (WAV, NPY) live in
 * lib/datasets/time-series.ts; `memorySampleSource` wraps arrays already in
 * memory (tests, the simulator).
 */
export interface SampleSource {
  readonly channels: number;
  /** Samples per second. */
  readonly sampleRate: number;
  /** Samples per channel in the whole recording. */
  readonly samplesPerChannel: number;
  /**
   * Reads the next `count` samples of every channel into out[c][offset …
   * offset + count − 1]. Resolves with the number read, which is smaller than
   * `count` only at the end of the recording. Rejects with the reader's own
   * error (e.g. a truncated file).
   */
  read(out: Float32Array[], offset: number, count: number): Promise<number>;
  /** Moves the read position to sample `sample` (0-based), if the source supports it. */
  seek?(sample: number): Promise<void>;
  /** Releases the file, if any. Safe to call twice. */
  close(): Promise<void>;
}

/** A SampleSource over per-channel arrays (not copied). */
export function memorySampleSource(channels: ArrayLike<number>[], sampleRate: number): SampleSource {
  const m = channels.length;
  const total = m === 0 ? 0 : Math.min(...channels.map((c) => c.length));
  let position = 0;
  return {
    channels: m,
    sampleRate,
    samplesPerChannel: total,
    async read(out, offset, count) {
      const take = Math.max(0, Math.min(count, total - position));
      for (let c = 0; c < m; c++) {
        const src = channels[c];
        const dst = out[c];
        for (let s = 0; s < take; s++) dst[offset + s] = src[position + s];
      }
      position += take;
      return take;
    },
    async seek(sample) {
      position = Math.max(0, Math.min(total, Math.floor(sample)));
    },
    async close() {},
  };
}
