/**
 * Byte builders for the hostile-input corpus, shared by the reader tests
 * (tests/lib/datasets/hostile.test.ts) and the upload-route tests
 * (tests/api/datasets.test.ts).
 */

/** Deterministic pseudo-random bytes (xorshift32), for garbage inputs. */
export function garbage(n: number, seed: number): Buffer {
  const out = Buffer.alloc(n);
  let x = seed >>> 0 || 1;
  for (let i = 0; i < n; i++) {
    x ^= x << 13;
    x >>>= 0;
    x ^= x >>> 17;
    x ^= x << 5;
    x >>>= 0;
    out[i] = x & 0xff;
  }
  return out;
}

/** An NPY file built byte by byte (for hostile variants numpy would not write). */
export function npy(header: string, data: Buffer, opts: { major?: number; declaredLength?: number } = {}): Buffer {
  const major = opts.major ?? 1;
  const body = Buffer.from(header + '\n', 'latin1');
  const pre = Buffer.alloc(major === 1 ? 10 : 12);
  Buffer.from([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, major, 0]).copy(pre);
  if (major === 1) pre.writeUInt16LE(opts.declaredLength ?? body.length, 8);
  else pre.writeUInt32LE(opts.declaredLength ?? body.length, 8);
  return Buffer.concat([pre, body, data]);
}

/** Little-endian float64 bytes of the values (interleaved re/im for complex128 data). */
export function float64LE(values: number[]): Buffer {
  const b = Buffer.alloc(values.length * 8);
  values.forEach((v, i) => b.writeDoubleLE(v, i * 8));
  return b;
}
