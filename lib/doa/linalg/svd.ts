/**
 * Singular value decomposition of a complex matrix, A = U·diag(s)·Vᴴ, by
 * one-sided (Hestenes) Jacobi rotations.
 *
 * Layout: ComplexMatrix (split re/im, row-major, index origin 0). For an
 * m × n input the result has r = min(m, n) singular values `s` in DESCENDING
 * order, `u` m × r with orthonormal columns, and `v` n × n unitary (the full
 * right factor: columns r…n−1 span the null space when m < n, which TLS-ESPRIT
 * needs). Columns of u belonging to zero singular values are zero vectors.
 * The input is not mutated.
 *
 * Why Jacobi: the matrices here are small (at most a few hundred × 2K), and
 * one-sided Jacobi computes small singular values to high relative accuracy
 * (Demmel & Veselić, SIAM J. Matrix Anal. Appl. 13(4), 1992) with a simple
 * complex rotation; ml-matrix's SVD is real-only.
 */
import { requireFiniteEntries } from '../checks';
import { ComplexMatrix, zeros } from './complex';
import { DoaNumericalError } from '../errors';

export interface SvdResult {
  readonly u: ComplexMatrix;
  readonly s: Float64Array;
  readonly v: ComplexMatrix;
}

const MAX_SWEEPS = 80;

export function svd(a: ComplexMatrix): SvdResult {
  requireFiniteEntries(a.re, 'svd: real part');
  requireFiniteEntries(a.im, 'svd: imaginary part');
  const m = a.rows;
  const n = a.cols;
  // Column-major working copies: column j occupies [j·m, (j+1)·m).
  const wr = new Float64Array(m * n);
  const wi = new Float64Array(m * n);
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < n; j++) {
      wr[j * m + i] = a.re[i * n + j];
      wi[j * m + i] = a.im[i * n + j];
    }
  }
  // V, also column-major (column j at [j·n, (j+1)·n)).
  const vr = new Float64Array(n * n);
  const vi = new Float64Array(n * n);
  for (let j = 0; j < n; j++) vr[j * n + j] = 1;
  const norms = new Float64Array(n);
  let frob2 = 0;
  for (let j = 0; j < n; j++) {
    norms[j] = columnNorm2(wr, wi, j * m, m);
    frob2 += norms[j];
  }
  // Columns whose squared norm falls below this are numerically zero (they
  // appear when rank < n, e.g. always when m < n) and are not rotated further.
  const negligible = frob2 * (Number.EPSILON * Number.EPSILON) * Math.max(m, n);

  const eps = Number.EPSILON;
  let converged = false;
  for (let sweep = 0; sweep < MAX_SWEEPS && !converged; sweep++) {
    converged = true;
    for (let p = 0; p < n - 1; p++) {
      for (let q = p + 1; q < n; q++) {
        const alpha = norms[p];
        const beta = norms[q];
        if (alpha <= negligible || beta <= negligible) continue;
        // γ = u_pᴴ·u_q
        let gr = 0;
        let gi = 0;
        const op = p * m;
        const oq = q * m;
        for (let i = 0; i < m; i++) {
          const ar = wr[op + i];
          const ai = wi[op + i];
          const br = wr[oq + i];
          const bi = wi[oq + i];
          gr += ar * br + ai * bi;
          gi += ar * bi - ai * br;
        }
        const g = Math.hypot(gr, gi);
        if (g <= eps * Math.sqrt(alpha * beta)) continue;
        converged = false;
        const zeta = (beta - alpha) / (2 * g);
        const t = (zeta >= 0 ? 1 : -1) / (Math.abs(zeta) + Math.sqrt(1 + zeta * zeta));
        const c = 1 / Math.sqrt(1 + t * t);
        const s = c * t;
        // e^{−jφ} with γ = |γ|·e^{jφ}
        const er = gr / g;
        const ei = -gi / g;
        rotate(wr, wi, op, oq, m, c, s, er, ei);
        rotate(vr, vi, p * n, q * n, n, c, s, er, ei);
        norms[p] = columnNorm2(wr, wi, op, m);
        norms[q] = columnNorm2(wr, wi, oq, m);
      }
    }
  }
  if (!converged)
    throw new DoaNumericalError('no-convergence', `svd: Jacobi sweeps did not converge for a ${m} × ${n} matrix`);

  const r = Math.min(m, n);
  const sigma = new Float64Array(n);
  for (let j = 0; j < n; j++) sigma[j] = Math.sqrt(columnNorm2(wr, wi, j * m, m));
  const order = Array.from({ length: n }, (_, j) => j).sort((x, y) => sigma[y] - sigma[x] || x - y);
  const s = new Float64Array(r);
  const u = zeros(m, r);
  const v = zeros(n, n);
  for (let jj = 0; jj < n; jj++) {
    const j = order[jj];
    for (let i = 0; i < n; i++) {
      v.re[i * n + jj] = vr[j * n + i];
      v.im[i * n + jj] = vi[j * n + i];
    }
    if (jj < r) {
      s[jj] = sigma[j];
      if (sigma[j] > 0) {
        const inv = 1 / sigma[j];
        for (let i = 0; i < m; i++) {
          u.re[i * r + jj] = wr[j * m + i] * inv;
          u.im[i * r + jj] = wi[j * m + i] * inv;
        }
      }
    }
  }
  return { u, s, v };
}

function columnNorm2(re: Float64Array, im: Float64Array, offset: number, length: number): number {
  let s = 0;
  for (let i = 0; i < length; i++) s += re[offset + i] * re[offset + i] + im[offset + i] * im[offset + i];
  return s;
}

/** x ← c·x − s·e·y, y ← s·conj(e)·x + c·y, with e = e^{−jφ} (|e| = 1). */
function rotate(
  re: Float64Array,
  im: Float64Array,
  ox: number,
  oy: number,
  len: number,
  c: number,
  s: number,
  er: number,
  ei: number,
): void {
  for (let i = 0; i < len; i++) {
    const xr = re[ox + i];
    const xi = im[ox + i];
    const yr = re[oy + i];
    const yi = im[oy + i];
    // e·y
    const eyr = er * yr - ei * yi;
    const eyi = er * yi + ei * yr;
    // conj(e)·x
    const exr = er * xr + ei * xi;
    const exi = er * xi - ei * xr;
    re[ox + i] = c * xr - s * eyr;
    im[ox + i] = c * xi - s * eyi;
    re[oy + i] = s * exr + c * yr;
    im[oy + i] = s * exi + c * yi;
  }
}
