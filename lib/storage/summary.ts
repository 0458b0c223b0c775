/**
 * The figures a dataset page shows, computed once at upload from the parsed
 * snapshots (rows = snapshots, split re/im, row-major) and stored with the
 * record. Plain TypeScript (no server-only imports) so the demo seed can use it.
 */
import { CovarianceAccumulator, hermitianEigen, sourceCountCriteria } from '../doa';
import type { ParsedSnapshots } from '../datasets';

export const PREVIEW_ROWS = 20;
export const HEATMAP_MAX_ELEMENTS = 128;

/** What the dataset page and GET /api/v1/datasets/{id} show. */
export interface DatasetSummary {
  /** 10·log10 of the mean |x|² per channel (element), dB re 1; −300 for a dead channel. */
  channelPowerDb: number[];
  /** Eigenvalues of the sample covariance R = X·Xᴴ/N, descending. */
  eigenvalues: number[];
  /** MDL(k) and AIC(k), k = 0 … M−1 (Wax & Kailath 1985, from lib/doa). */
  mdl: number[];
  aic: number[];
  mdlChoice: number;
  aicChoice: number;
  /** |R[i][k]| (M ≤ 128; null above). */
  covarianceMagnitude: number[][] | null;
  /** The first snapshots as stored (rows = snapshots, columns = elements). */
  preview: { re: number[][]; im: number[][] };
}

/** Computes the page's figures from parsed snapshots (rows = snapshots). */
export function summarise(parsed: Pick<ParsedSnapshots, 'elements' | 'snapshots' | 're' | 'im'>): DatasetSummary {
  const m = parsed.elements;
  const n = parsed.snapshots;
  const power = new Array<number>(m).fill(0);
  for (let r = 0; r < n; r++) {
    const base = r * m;
    for (let c = 0; c < m; c++) power[c] += parsed.re[base + c] ** 2 + parsed.im[base + c] ** 2;
  }
  const channelPowerDb = power.map((p) => (p > 0 ? 10 * Math.log10(p / n) : -300));
  const acc = new CovarianceAccumulator(m);
  acc.addRows({ rows: n, cols: m, re: parsed.re, im: parsed.im });
  const r = acc.covariance();
  const eig = hermitianEigen(r, { vectors: false });
  const eigenvalues = Array.from(eig.values);
  let mdl: number[] = [];
  let aic: number[] = [];
  let mdlChoice = 0;
  let aicChoice = 0;
  if (eigenvalues[0] > 0) {
    const crit = sourceCountCriteria(eig.values, n);
    mdl = crit.mdl;
    aic = crit.aic;
    mdlChoice = crit.mdlChoice;
    aicChoice = crit.aicChoice;
  }
  let covarianceMagnitude: number[][] | null = null;
  if (m <= HEATMAP_MAX_ELEMENTS) {
    covarianceMagnitude = [];
    for (let i = 0; i < m; i++) {
      const row: number[] = [];
      for (let k = 0; k < m; k++) row.push(Math.hypot(r.re[i * m + k], r.im[i * m + k]));
      covarianceMagnitude.push(row);
    }
  }
  const rows = Math.min(n, PREVIEW_ROWS);
  const preview = { re: [] as number[][], im: [] as number[][] };
  for (let i = 0; i < rows; i++) {
    preview.re.push(Array.from(parsed.re.subarray(i * m, (i + 1) * m)));
    preview.im.push(Array.from(parsed.im.subarray(i * m, (i + 1) * m)));
  }
  return { channelPowerDb, eigenvalues, mdl, aic, mdlChoice, aicChoice, covarianceMagnitude, preview };
}
