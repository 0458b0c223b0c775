/**
 * The inline estimate both service benchmarks send (scripts/bench-service.ts over HTTP,
 * scripts/bench-request.ts in process): M = 16, N = 1000, two sources, LS-ESPRIT, no spectrum.
 */
import { simulateSnapshots } from '../lib/doa/sim/simulate';

export function inlineEstimateBody(): string {
  const m = 16;
  const n = 1000;
  const x = simulateSnapshots({
    elements: m,
    spacingWavelengths: 0.5,
    bearingsDeg: [-12, 20],
    powers: [10, 10],
    noisePower: 1,
    snapshots: n,
    seed: 2026,
  });
  // The engine's matrix is M × N; the request is N rows of M.
  const re: number[][] = [];
  const im: number[][] = [];
  for (let s = 0; s < n; s++) {
    re.push(Array.from({ length: m }, (_, e) => x.re[e * n + s]));
    im.push(Array.from({ length: m }, (_, e) => x.im[e * n + s]));
  }
  return JSON.stringify({
    method: 'esprit-ls',
    sourceCount: 2,
    includeSpectrum: false,
    array: { elements: m, spacingWavelengths: 0.5 },
    snapshots: { re, im },
  });
}
