/**
 * The covariance block kernel: for every 2 × 2 tile of the upper triangle, the block sums
 * Σ_t x_i·conj(x_k). WebAssembly SIMD (covariance.wat, bytes in covariance-wasm.ts, built by
 * scripts/build-wasm.mjs) where the runtime has it, else the same arithmetic in the same
 * order in JavaScript, so the two give bit for bit the same sums (tests/lib/doa/covariance.test.ts).
 *
 * Block layout (`buf`): p element rows of 2·b doubles, real parts of element i at
 * 2b·i + t, imaginary parts at 2b·i + b + t; p and `count` even (the caller zero-pads).
 * Order: two partial sums per entry, even t and odd t, each acc + ((ar·cr) + (ai·ci)) for
 * the real part and acc + ((ai·cr) − (ar·ci)) for the imaginary part; the entry is
 * even + odd. Output: real parts at i·p + k, imaginary parts at p·p + i·p + k, written
 * (not accumulated) for the four entries of each tile (i, k even, i ≤ k).
 */
import { covarianceWasmBase64 } from './covariance-wasm';

interface WasmKernel {
  memory: WebAssembly.Memory;
  tiles: (buf: number, out: number, p: number, b: number, count: number) => void;
}

export type CovarianceKernelChoice = 'auto' | 'js';

let choice: CovarianceKernelChoice = 'auto';
let wasm: WasmKernel | null | undefined;

/** Forces the JavaScript kernel ('js') or the default ('auto': WebAssembly when available). For tests. */
export function setCovarianceKernel(next: CovarianceKernelChoice): void {
  choice = next;
}

function decode(base64: string): Uint8Array<ArrayBuffer> {
  const bytes = typeof Buffer !== 'undefined' ? Buffer.from(base64, 'base64') : null;
  if (bytes) return new Uint8Array(bytes);
  return Uint8Array.from(atob(base64), (c) => c.charCodeAt(0));
}

function wasmKernel(): WasmKernel | null {
  if (wasm !== undefined) return wasm;
  try {
    const compiled = new WebAssembly.Module(decode(covarianceWasmBase64));
    const instance = new WebAssembly.Instance(compiled, {});
    const exports = instance.exports as unknown as WasmKernel;
    wasm = { memory: exports.memory, tiles: exports.tiles };
  } catch {
    wasm = null; // no WebAssembly SIMD here: the JavaScript kernel gives the same bits
  }
  return wasm;
}

/** Which kernel blockTileSums uses now ('wasm' or 'js'). */
export function covarianceKernelInUse(): 'wasm' | 'js' {
  return choice === 'auto' && wasmKernel() ? 'wasm' : 'js';
}

let jsOut = new Float64Array(0);

/**
 * Tile sums of one block (layout above). Returns the array holding them and the offset of
 * entry 0; it is valid until the next call.
 */
export function blockTileSums(
  buf: Float64Array,
  p: number,
  b: number,
  count: number,
): { sums: Float64Array; at: number } {
  const kernel = choice === 'auto' ? wasmKernel() : null;
  const bufBytes = 16 * p * b;
  if (kernel && roomFor(kernel, bufBytes + 16 * p * p)) {
    const heap = new Float64Array(kernel.memory.buffer);
    if (count === b) heap.set(buf.subarray(0, 2 * p * b), 0);
    else {
      for (let i = 0; i < p; i++) {
        const o = 2 * b * i;
        heap.set(buf.subarray(o, o + count), o);
        heap.set(buf.subarray(o + b, o + b + count), o + b);
      }
    }
    kernel.tiles(0, bufBytes, p, b, count);
    return { sums: heap, at: 2 * p * b };
  }
  if (jsOut.length < 2 * p * p) jsOut = new Float64Array(2 * p * p);
  jsTiles(buf, jsOut, p, b, count);
  return { sums: jsOut, at: 0 };
}

/** Grows the kernel's memory to `bytes`; false when it cannot (the JavaScript kernel then runs). */
function roomFor(kernel: WasmKernel, bytes: number): boolean {
  const have = kernel.memory.buffer.byteLength;
  if (have >= bytes) return true;
  try {
    kernel.memory.grow(Math.ceil((bytes - have) / 65536));
    return true;
  } catch {
    return false;
  }
}

function jsTiles(buf: Float64Array, out: Float64Array, p: number, b: number, count: number): void {
  const row = 2 * b;
  const pp = p * p;
  for (let i = 0; i < p; i += 2) {
    const o0 = i * row;
    const o1 = o0 + row;
    for (let k = i; k < p; k += 2) {
      const q0 = k * row;
      const q1 = q0 + row;
      // [even t, odd t] partial sums of the four entries
      let r00e = 0, r00o = 0, j00e = 0, j00o = 0, r01e = 0, r01o = 0, j01e = 0, j01o = 0; // prettier-ignore
      let r10e = 0, r10o = 0, j10e = 0, j10o = 0, r11e = 0, r11o = 0, j11e = 0, j11o = 0; // prettier-ignore
      for (let t = 0; t < count; t += 2) {
        for (let lane = 0; lane < 2; lane++) {
          const s = t + lane;
          const ar0 = buf[o0 + s];
          const ai0 = buf[o0 + b + s];
          const ar1 = buf[o1 + s];
          const ai1 = buf[o1 + b + s];
          const c0r = buf[q0 + s];
          const c0i = buf[q0 + b + s];
          const c1r = buf[q1 + s];
          const c1i = buf[q1 + b + s];
          const r00 = ar0 * c0r + ai0 * c0i;
          const j00 = ai0 * c0r - ar0 * c0i;
          const r10 = ar1 * c0r + ai1 * c0i;
          const j10 = ai1 * c0r - ar1 * c0i;
          const r01 = ar0 * c1r + ai0 * c1i;
          const j01 = ai0 * c1r - ar0 * c1i;
          const r11 = ar1 * c1r + ai1 * c1i;
          const j11 = ai1 * c1r - ar1 * c1i;
          if (lane === 0) {
            r00e += r00;
            j00e += j00;
            r10e += r10;
            j10e += j10; // prettier-ignore
            r01e += r01;
            j01e += j01;
            r11e += r11;
            j11e += j11; // prettier-ignore
          } else {
            r00o += r00;
            j00o += j00;
            r10o += r10;
            j10o += j10; // prettier-ignore
            r01o += r01;
            j01o += j01;
            r11o += r11;
            j11o += j11; // prettier-ignore
          }
        }
      }
      const at = i * p + k;
      out[at] = r00e + r00o;
      out[at + 1] = r01e + r01o;
      out[at + p] = r10e + r10o;
      out[at + p + 1] = r11e + r11o;
      out[pp + at] = j00e + j00o;
      out[pp + at + 1] = j01e + j01o;
      out[pp + at + p] = j10e + j10o;
      out[pp + at + p + 1] = j11e + j11o;
    }
  }
}
