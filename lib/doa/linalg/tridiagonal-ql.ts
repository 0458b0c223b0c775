/**
 * Eigenvalues and eigenvectors of a real symmetric tridiagonal matrix by the
 * implicit QL algorithm with Wilkinson-type shifts (the method of Bowdler,
 * Martin, Reinsch & Wilkinson, "The QR and QL algorithms for symmetric
 * matrices", Numer. Math. 11, 1968; the same scheme as EISPACK tql2).
 *
 * Layout: `diagonal` has n entries; `offDiagonal[i]` is T[i, i+1] for
 * i = 0 … n−2 (entry n−1 is ignored). Both arrays are overwritten
 * (hence `InPlace`): on return `diagonal` holds the eigenvalues, unsorted.
 * Rotations are accumulated into `zt`, an n × n row-major array holding the
 * TRANSPOSE of the eigenvector matrix (row j is eigenvector j), so that each
 * rotation touches two contiguous rows. Pass `null` for eigenvalues only.
 */
import { DoaNumericalError } from '../errors';

export function tridiagonalQlInPlace(
  diagonal: Float64Array,
  offDiagonal: Float64Array,
  zt: Float64Array | null,
  /** Optional scratch of at least n entries (a caller that decomposes many matrices reuses it). */
  scratch?: Float64Array,
): void {
  const n = diagonal.length;
  if (n <= 1) return;
  const d = diagonal;
  // e[i] = T[i, i+1], e[n−1] = 0.
  const e = scratch && scratch.length >= n ? scratch : new Float64Array(n);
  e[n - 1] = 0;
  for (let i = 0; i < n - 1; i++) e[i] = offDiagonal[i];
  const eps = Number.EPSILON;
  let f = 0;
  let tst1 = 0;
  for (let l = 0; l < n; l++) {
    tst1 = Math.max(tst1, Math.abs(d[l]) + Math.abs(e[l]));
    let m = l;
    while (m < n - 1) {
      if (Math.abs(e[m]) <= eps * tst1) break;
      m++;
    }
    if (m > l) {
      let iter = 0;
      do {
        if (++iter > 60) {
          throw new DoaNumericalError('no-convergence', `tridiagonal QL did not converge for eigenvalue ${l} of ${n}`);
        }
        // Shift from the leading 2 × 2 block.
        let g = d[l];
        let p = (d[l + 1] - g) / (2 * e[l]);
        let r = Math.hypot(p, 1);
        if (p < 0) r = -r;
        d[l] = e[l] / (p + r);
        d[l + 1] = e[l] * (p + r);
        const dl1 = d[l + 1];
        let h = g - d[l];
        for (let i = l + 2; i < n; i++) d[i] -= h;
        f += h;
        // Implicit QL sweep from m up to l.
        p = d[m];
        let c = 1;
        let c2 = c;
        let c3 = c;
        const el1 = e[l + 1];
        let s = 0;
        let s2 = 0;
        for (let i = m - 1; i >= l; i--) {
          c3 = c2;
          c2 = c;
          s2 = s;
          g = c * e[i];
          h = c * p;
          r = Math.hypot(p, e[i]);
          e[i + 1] = s * r;
          s = e[i] / r;
          c = p / r;
          p = c * d[i] - s * g;
          d[i + 1] = h + s * (c * g + s * d[i]);
          if (zt !== null) {
            const ri = i * n;
            const rj = ri + n;
            for (let k = 0; k < n; k++) {
              const zk1 = zt[rj + k];
              const zk = zt[ri + k];
              zt[rj + k] = s * zk + c * zk1;
              zt[ri + k] = c * zk - s * zk1;
            }
          }
        }
        p = (-s * s2 * c3 * el1 * e[l]) / dl1;
        e[l] = s * p;
        d[l] = c * p;
      } while (Math.abs(e[l]) > eps * tst1);
    }
    d[l] = d[l] + f;
    e[l] = 0;
  }
}
