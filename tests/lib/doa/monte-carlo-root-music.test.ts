// Seeded Monte Carlo: root-MUSIC efficiency against the closed-form single-source
// stochastic CRB (docs/references.md §5, Stoica & Nehorai 1990), and MDL detection rate.
// Scenario from issue 3: one source at broadside, 0 dB per element, N = 100,
// d = λ/2, M from 8 to 64; 200 trials per M (RMSE ratio standard error ≈ 1/√(2·200) = 5 %).
// Band 0.80 … 1.15 × √CRB (docs/references.md §9). Seven element counts are tested at once, so
// the lower limit sits four standard errors below 1 (a family-wise false alarm below 0.05 %);
// with these seeds M = 48 measures 0.83, which a three-standard-error limit (0.85) would reject
// by chance alone. An estimator that beat the bound, or returned the truth, still fails.
import { describe, expect, it } from 'vitest';
import { simulateSnapshots } from '@/lib/doa/sim/simulate';
import { sampleCovariance } from '@/lib/doa/covariance';
import { hermitianEigen } from '@/lib/doa/linalg/hermitian-eigen';
import { rootMusicElectricalAngles } from '@/lib/doa/methods/root-music';
import { bearingsFromElectricalAngles } from '@/lib/doa/angles';
import { estimateSourceCount } from '@/lib/doa/methods/source-count';
import { logLogSlope, singleSourceStochasticCrbDeg } from './helpers';

const ELEMENTS = [8, 12, 16, 24, 32, 48, 64];
const TRIALS = 200;

describe('root-MUSIC Monte Carlo (single source, 0 dB, N = 100)', () => {
  it('stays between 0.80 and 1.15 × √CRB and its log–log slope against M lies in −1.5 ± 0.1', () => {
    const rmse: number[] = [];
    const ratios: number[] = [];
    for (const m of ELEMENTS) {
      let sum = 0;
      for (let t = 0; t < TRIALS; t++) {
        const x = simulateSnapshots({
          elements: m,
          spacingWavelengths: 0.5,
          bearingsDeg: [0],
          noisePower: 1,
          snapshots: 100,
          seed: 100000 + 1000 * m + t,
        });
        const eig = hermitianEigen(sampleCovariance(x));
        const b = bearingsFromElectricalAngles(rootMusicElectricalAngles(eig.vectors, 1, 0.5), 0.5).bearingsDeg[0];
        sum += b * b;
      }
      const e = Math.sqrt(sum / TRIALS);
      rmse.push(e);
      ratios.push(e / singleSourceStochasticCrbDeg(m, 100, 1));
    }
    const slope = logLogSlope(ELEMENTS, rmse);
    console.info(
      'root-MUSIC RMSE/√CRB by M',
      ELEMENTS.map((m, i) => `${m}:${ratios[i].toFixed(3)}`).join(' '),
      'slope',
      slope.toFixed(3),
    );
    for (const r of ratios) {
      expect(r).toBeGreaterThan(0.8);
      expect(r).toBeLessThan(1.15);
    }
    expect(slope).toBeGreaterThan(-1.6);
    expect(slope).toBeLessThan(-1.4);
    // Sanity: the CRB check value of docs/references.md §5 (M=10, N=100, 0 dB: 0.148911°).
    expect(singleSourceStochasticCrbDeg(10, 100, 1)).toBeCloseTo(0.148911, 6);
    // 1400 root-MUSIC runs up to M = 64: measured 66–100 s on a shared, loaded 2-core machine.
  }, 180_000);
});

describe('MDL detection rate (two sources, 10 dB, N = 200, M = 8)', () => {
  it('finds the true K = 2 in at least 95 % of 300 trials', () => {
    let hits = 0;
    const trials = 300;
    for (let t = 0; t < trials; t++) {
      const x = simulateSnapshots({
        elements: 8,
        spacingWavelengths: 0.5,
        bearingsDeg: [-20, 15],
        powers: [1, 1],
        noisePower: 0.1,
        snapshots: 200,
        seed: 700000 + t,
      });
      const values = hermitianEigen(sampleCovariance(x), { vectors: false }).values;
      if (estimateSourceCount(values, 200, 'mdl') === 2) hits++;
    }
    console.info('MDL hit rate', hits / trials);
    expect(hits / trials).toBeGreaterThanOrEqual(0.95);
  });
});
