/**
 * Inverse of a small real K × K matrix (row-major Float64Array, index origin 0) by
 * Gauss–Jordan elimination with partial pivoting. Used for Fisher information matrices;
 * a pivot below K·1e−15 × the largest entry counts as singular.
 */
import { DoaNumericalError } from '../errors';

export function invertReal(a: Float64Array, k: number): Float64Array {
  const w = a.slice();
  const inv = new Float64Array(k * k);
  for (let i = 0; i < k; i++) inv[i * k + i] = 1;
  let scale = 0;
  for (let i = 0; i < w.length; i++) scale = Math.max(scale, Math.abs(w[i]));
  for (let col = 0; col < k; col++) {
    let piv = col;
    for (let r = col + 1; r < k; r++) if (Math.abs(w[r * k + col]) > Math.abs(w[piv * k + col])) piv = r;
    if (!(Math.abs(w[piv * k + col]) > scale * k * 1e-15)) {
      throw new DoaNumericalError(
        'singular-matrix',
        'the Fisher information matrix is singular: the sources cannot be told apart',
      );
    }
    if (piv !== col) {
      for (let c = 0; c < k; c++) {
        let t = w[col * k + c];
        w[col * k + c] = w[piv * k + c];
        w[piv * k + c] = t;
        t = inv[col * k + c];
        inv[col * k + c] = inv[piv * k + c];
        inv[piv * k + c] = t;
      }
    }
    const p = w[col * k + col];
    for (let c = 0; c < k; c++) {
      w[col * k + c] /= p;
      inv[col * k + c] /= p;
    }
    for (let r = 0; r < k; r++) {
      if (r === col) continue;
      const f = w[r * k + col];
      if (f === 0) continue;
      for (let c = 0; c < k; c++) {
        w[r * k + c] -= f * w[col * k + c];
        inv[r * k + c] -= f * inv[col * k + c];
      }
    }
  }
  return inv;
}
