// Methods of docs/conventions.md §4: numpy reference fixtures (fixtures/doa/generate.py, an
// independent implementation of the conventions), noise-free exactness and the
// identities of docs/references.md §7.
import { describe, expect, it } from 'vitest';
import fixtures from '@/fixtures/doa/methods.json';
import { clone } from '@/lib/doa/linalg/complex';
import { estimateBearings } from '@/lib/doa/estimate';
import { DOA_METHODS, DoaMethod, METHOD_RUNNERS } from '@/lib/doa/methods/registry';
import { hermitianEigen } from '@/lib/doa/linalg/hermitian-eigen';
import { DEFAULT_GRID, gridAngles, pickPeaks } from '@/lib/doa/methods/spectrum';
import { musicDenominator } from '@/lib/doa/methods/music';
import { bartlettSpectrumValues, mvdrSpectrumValues } from '@/lib/doa/methods/beamformers';
import { electricalAngleToBearing, bearingsFromElectricalAngles } from '@/lib/doa/angles';
import { leftPiRealMatrix, unitaryEspritElectricalAngles } from '@/lib/doa/methods/unitary-esprit';
import { espritLsElectricalAngles, signalSubspace } from '@/lib/doa/methods/esprit';
import { conjugateTranspose, identity, multiply, subtract, frobeniusNorm } from '@/lib/doa/linalg/complex';
import { simulateSnapshots } from '@/lib/doa/sim/simulate';
import { sampleCovariance } from '@/lib/doa/covariance';
import { exactCovariance, matrixFromJson, maxAbsDiff, JsonMatrix } from './helpers';

interface Scenario {
  name: string;
  elements: number;
  spacingWavelengths: number;
  rows: JsonMatrix;
  options: Record<string, unknown>;
  eigenvalues: number[];
  sourceCount: number;
  sourceCountRule: string;
  criteria: { mdl: number[]; aic: number[]; logLikelihood: number[] };
  bearingsDeg: Record<DoaMethod, number[]>;
  spectra: Record<'music' | 'bartlett' | 'mvdr', { peakIndices: number[]; sampleEvery: number; valuesDb: number[] }>;
}
const scenarios = (fixtures as unknown as { scenarios: Scenario[] }).scenarios;

describe('agreement with the numpy reference on seeded noisy data', () => {
  for (const s of scenarios) {
    describe(s.name, () => {
      const rows = matrixFromJson(s.rows);
      for (const method of DOA_METHODS) {
        it(`${method} matches numpy (≤1e-6°; spectral methods: the same grid points)`, () => {
          const before = clone(rows);
          const r = estimateBearings({
            rows,
            spacingWavelengths: s.spacingWavelengths,
            method,
            includeSpectrum: true,
            ...s.options,
          });
          expect(rows).toEqual(before); // no mutation
          expect(r.sourceCount).toBe(s.sourceCount);
          expect(r.sourceCountRule).toBe(s.sourceCountRule);
          expect(r.bearingsDeg.length).toBe(s.bearingsDeg[method].length);
          // Source: fixtures/doa/methods.json (numpy 2.4 / LAPACK). Tolerance 1e-6° absolute.
          expect(maxAbsDiff(r.bearingsDeg, s.bearingsDeg[method])).toBeLessThanOrEqual(1e-6);
          // Bearings ascending (docs/conventions.md §4).
          expect([...r.bearingsDeg].sort((a, b) => a - b)).toEqual(r.bearingsDeg);
          // Eigenvalues: 1e-12 relative to the largest.
          expect(maxAbsDiff(r.eigenvalues, s.eigenvalues)).toBeLessThan(1e-12 * s.eigenvalues[0]);
          if (method === 'music' || method === 'bartlett' || method === 'mvdr') {
            const spec = s.spectra[method];
            const got = r.spectrum!.valuesDb;
            expect(r.spectrum!.kind).toBe(method);
            // Spectrum values at every 50th grid point: 1e-8 dB absolute (≈ 2e-9 relative in P).
            const sampled = spec.valuesDb.map((_, i) => got[i * spec.sampleEvery]);
            expect(maxAbsDiff(sampled, spec.valuesDb)).toBeLessThan(1e-8);
            expect(pickPeaks(r.spectrum!.valuesDb, s.sourceCount)).toEqual(spec.peakIndices);
          }
        });
      }
      it('MDL/AIC curves match numpy (1e-9 relative)', () => {
        const r = estimateBearings({
          rows,
          spacingWavelengths: s.spacingWavelengths,
          method: 'esprit-ls',
          ...s.options,
        });
        for (const key of ['mdl', 'aic', 'logLikelihood'] as const) {
          s.criteria[key].forEach((v, k) =>
            expect(Math.abs(r.criteria[key][k] - v)).toBeLessThan(1e-9 * Math.max(1, Math.abs(v))),
          );
        }
      });
    });
  }
});

describe('noise-free exactness with the exact covariance (docs/references.md §7)', () => {
  // Setup from docs/references.md §7: M=8, d=λ/2, θ = (−20°, 10.5°, 35°), P = diag(1, 2, 0.5), σ² = 0.1.
  const truth = [-20, 10.5, 35];
  const r = exactCovariance(8, 0.5, truth, [1, 2, 0.5], 0.1);
  const eig = hermitianEigen(r);
  const input = {
    covariance: r,
    eigenvalues: eig.values,
    eigenvectors: eig.vectors,
    sourceCount: 3,
    spacingWavelengths: 0.5,
    grid: DEFAULT_GRID,
  };

  it('eigenvalues are 16.38799, 8.11510, 3.79691 and then σ² = 0.1 five times', () => {
    // Source: docs/references.md §7 [computed]; printed to 5 decimals. Noise eigenvalues equal σ² (analytic).
    [16.38799, 8.1151, 3.79691].forEach((v, i) => expect(Math.abs(eig.values[i] - v)).toBeLessThan(5e-6));
    for (let i = 3; i < 8; i++) expect(Math.abs(eig.values[i] - 0.1)).toBeLessThan(1e-14);
  });
  for (const method of ['esprit-ls', 'esprit-tls', 'esprit-unitary'] as const) {
    it(`${method} returns the true bearings within 1e-9°`, () => {
      // Source: docs/references.md §7 (error below 1e-12° there); the issue asks 1e-9°.
      expect(maxAbsDiff(METHOD_RUNNERS[method](input).bearingsDeg, truth)).toBeLessThan(1e-9);
    });
  }
  it('root-MUSIC returns the true bearings within 1e-6° (double roots: ~1e-7° expected)', () => {
    // Source: docs/references.md §7, "error about 1e-7°, use a tolerance of about 1e-6°".
    expect(maxAbsDiff(METHOD_RUNNERS['root-music'](input).bearingsDeg, truth)).toBeLessThan(1e-6);
  });
  it('music peaks fall exactly on the true grid points (MVDR and Bartlett are biased for several sources)', () => {
    expect(METHOD_RUNNERS.music(input).bearingsDeg).toEqual(truth);
  });
  it('the MUSIC denominator at the true angles is at rounding level (about 1e-30, docs/references.md §7)', () => {
    const den = musicDenominator(eig.vectors, 3, 0.5, Float64Array.from(truth));
    for (const v of den) expect(v).toBeLessThan(1e-26);
  });
  it('Unitary ESPRIT: Q_L is unitary and left-Π-real (Π·conj(Q) = Q) for even and odd L (Haardt & Nossek 1995)', () => {
    for (const n of [6, 7]) {
      const q = leftPiRealMatrix(n);
      expect(frobeniusNorm(subtract(multiply(conjugateTranspose(q), q), identity(n)))).toBeLessThan(1e-15);
      for (let i = 0; i < n; i++)
        for (let k = 0; k < n; k++) {
          expect(q.re[(n - 1 - i) * n + k]).toBeCloseTo(q.re[i * n + k], 15);
          expect(-q.im[(n - 1 - i) * n + k]).toBeCloseTo(q.im[i * n + k], 15);
        }
    }
    // μ = 2·atan(ω) recovers the electrical angles with real ω (exact data).
    const mus = Array.from(unitaryEspritElectricalAngles(r, 3)).sort((a, b) => a - b);
    const want = truth.map((t) => Math.PI * Math.sin((t * Math.PI) / 180));
    expect(maxAbsDiff(mus, want)).toBeLessThan(1e-12);
  });
});

describe('single-source identities (docs/references.md §7)', () => {
  // One source p = 1, σ² = 0.1, M = 10, θ = 20°, exact covariance.
  const r = exactCovariance(10, 0.5, [20], [1], 0.1);
  const eig = hermitianEigen(r);
  const angles = Float64Array.from([20, -40]);
  it('MVDR: P = p + σ²/M = 1.01 at the source and 0.0100055 at −40°', () => {
    const p = mvdrSpectrumValues(eig.values, eig.vectors, 0.5, angles).values;
    expect(p[0]).toBeCloseTo(1.01, 12); // derived: 1/(aᴴR⁻¹a) = p + σ²/M
    expect(Math.abs(p[1] - 0.0100055)).toBeLessThan(5e-8); // docs/references.md §7 [computed], 6 significant digits
  });
  it('MVDR and Bartlett peak exactly at the single source (|a0ᴴa| is largest there; derived)', () => {
    const one = {
      covariance: r,
      eigenvalues: eig.values,
      eigenvectors: eig.vectors,
      sourceCount: 1,
      spacingWavelengths: 0.5,
      grid: DEFAULT_GRID,
    };
    expect(METHOD_RUNNERS.mvdr(one).bearingsDeg).toEqual([20]);
    expect(METHOD_RUNNERS.bartlett(one).bearingsDeg).toEqual([20]);
  });
  it('Bartlett: aᴴRa/M² = 1.01 at the source and 0.0105591 at −40°', () => {
    const p = bartlettSpectrumValues(r, 0.5, angles);
    expect(p[0]).toBeCloseTo(1.01, 12);
    expect(Math.abs(p[1] - 0.0105591)).toBeLessThan(5e-8);
  });
});

describe('spectrum evaluation: Horner on diagonal sums vs the direct formula', () => {
  it('MUSIC ‖Enᴴa‖² agrees with the direct sum to 1e-10 relative on noisy data (M = 64, K = 2)', () => {
    const x = simulateSnapshots({
      elements: 64,
      spacingWavelengths: 0.5,
      bearingsDeg: [-12.3, 40.1],
      noisePower: 1,
      snapshots: 200,
      seed: 3,
    });
    const eig = hermitianEigen(sampleCovariance(x));
    const angles = gridAngles(DEFAULT_GRID);
    const fast = musicDenominator(eig.vectors, 2, 0.5, angles);
    let worst = 0;
    for (let i = 0; i < angles.length; i += 7) {
      const mu = Math.PI * Math.sin((angles[i] * Math.PI) / 180);
      let direct = 0;
      for (let j = 2; j < 64; j++) {
        let sr = 0;
        let si = 0;
        for (let m = 0; m < 64; m++) {
          const er = eig.vectors.re[m * 64 + j];
          const ei = eig.vectors.im[m * 64 + j];
          sr += er * Math.cos(mu * m) + ei * Math.sin(mu * m);
          si += er * Math.sin(mu * m) - ei * Math.cos(mu * m);
        }
        direct += sr * sr + si * si;
      }
      worst = Math.max(worst, Math.abs(fast[i] - direct) / direct);
    }
    expect(worst).toBeLessThan(1e-10);
  });
});

describe('angle mapping and peak rules', () => {
  it('clips |μ/(2πd)| > 1 to ±90° and says so (docs/conventions.md §1)', () => {
    expect(electricalAngleToBearing(Math.PI * 1.2, 0.5)).toEqual({ bearingDeg: 90, clipped: true });
    expect(electricalAngleToBearing(-Math.PI * 1.2, 0.5)).toEqual({ bearingDeg: -90, clipped: true });
    const b = electricalAngleToBearing(Math.PI * Math.sin(Math.PI / 6), 0.5);
    expect(b.clipped).toBe(false);
    expect(b.bearingDeg).toBeCloseTo(30, 12);
    const many = bearingsFromElectricalAngles([2, -1, 4], 0.5);
    expect(many.clippedCount).toBe(1);
    expect(many.bearingsDeg).toEqual([...many.bearingsDeg].sort((x, y) => x - y));
  });
  it('an ESPRIT phase beyond 2π·d (d = 0.25) is clipped with an angle-clipped warning', () => {
    // Exact single source whose μ = 0.9π exceeds 2π·0.25 = π/2 once d is misstated as 0.25.
    const r = exactCovariance(6, 0.5, [(Math.asin(0.9) * 180) / Math.PI], [1], 0.01);
    const eig = hermitianEigen(r);
    const out = METHOD_RUNNERS['esprit-ls']({
      covariance: r,
      eigenvalues: eig.values,
      eigenvectors: eig.vectors,
      sourceCount: 1,
      spacingWavelengths: 0.25,
      grid: DEFAULT_GRID,
    });
    expect(out.bearingsDeg).toEqual([90]);
    expect(out.warnings.map((w) => w.code)).toEqual(['angle-clipped']);
    expect(Math.abs(espritLsElectricalAngles(signalSubspace(eig.vectors, 1))[0] - 0.9 * Math.PI)).toBeLessThan(1e-12);
  });
  it('peaks: strict rise then ≥, K largest, ties to the lower index, returned ascending (docs/conventions.md §4)', () => {
    expect(pickPeaks([0, 3, 3, 0, 5, 1, 2, 2, 1], 3)).toEqual([1, 4, 6]);
    expect(pickPeaks([0, 2, 1, 2, 1], 1)).toEqual([1]); // tie → lower index
    expect(pickPeaks([1, 2, 3], 2)).toEqual([]); // endpoints are never peaks
  });
});
