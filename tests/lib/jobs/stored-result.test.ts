/**
 * Consistency check: a run row stores its method results without MDL/AIC and the 95% intervals
 * (lib/jobs/estimate-run.ts compactStoredResult); expandStoredResult must give back exactly what
 * the compute returned, value for value, so every reader sees the same result as before.
 */
import { describe, expect, it } from 'vitest';
import { computeEstimate, type EstimateComputeInput } from '@/lib/jobs/compute';
import { compactStoredResult, expandStoredResult } from '@/lib/jobs/estimate-run';
import { simulateSnapshots } from '@/lib/doa/sim/simulate';

function rowsOf(elements: number, snapshots: number, bearingsDeg: number[], seed: number) {
  const x = simulateSnapshots({ elements, spacingWavelengths: 0.5, bearingsDeg, noisePower: 1, snapshots, seed });
  const re = new Float64Array(snapshots * elements);
  const im = new Float64Array(snapshots * elements);
  for (let i = 0; i < elements; i++)
    for (let n = 0; n < snapshots; n++) {
      re[n * elements + i] = x.re[i * snapshots + n];
      im[n * elements + i] = x.im[i * snapshots + n];
    }
  return { kind: 'matrix' as const, rows: snapshots, cols: elements, re, im };
}

describe('compact stored run results', () => {
  const cases: [string, EstimateComputeInput][] = [
    [
      'two sources, every method, spectra',
      {
        source: rowsOf(16, 1000, [-12, 20], 3),
        elements: 16,
        spacingWavelengths: 0.5,
        methods: ['esprit-ls', 'esprit-tls', 'esprit-unitary', 'music', 'root-music', 'bartlett', 'mvdr'],
        options: { sourceCount: 2, includeSpectrum: true },
      },
    ],
    [
      'MDL count, smoothing and forward-backward',
      {
        source: rowsOf(10, 200, [-30, 5, 40], 8),
        elements: 10,
        spacingWavelengths: 0.5,
        methods: ['esprit-ls', 'root-music'],
        options: { smoothingSubarray: 7, forwardBackward: true, sourceCountRule: 'aic' },
      },
    ],
    [
      'single snapshot',
      {
        source: rowsOf(12, 1, [10], 1),
        elements: 12,
        spacingWavelengths: 0.5,
        methods: ['esprit-ls'],
        options: { singleSnapshot: true, sourceCount: 1 },
      },
    ],
    [
      'disabled elements',
      {
        source: rowsOf(12, 300, [-8, 25], 4),
        elements: 12,
        spacingWavelengths: 0.5,
        methods: ['music', 'esprit-tls'],
        options: { sourceCount: 2 },
        enabledIndices: [0, 1, 2, 3, 5, 6, 7, 8, 9, 10, 11],
      },
    ],
  ];
  for (const [name, input] of cases) {
    it(`${name}: expand(compact(result)) equals the result`, async () => {
      const { results } = await computeEstimate(input, () => {});
      for (const r of results) {
        const stored = JSON.parse(JSON.stringify(compactStoredResult(r)));
        expect(stored.criteria.mdl).toBeUndefined();
        if (r.spectrum) {
          expect(stored.spectrum.valuesDb).toBeUndefined();
          expect(typeof stored.spectrum.valuesF64).toBe('string');
        }
        if (r.uncertainty) expect(stored.uncertainty.ci95Deg).toBeUndefined();
        const back = expandStoredResult(stored);
        expect(back).toEqual(JSON.parse(JSON.stringify(r)));
        expect(JSON.stringify(back)).toBe(JSON.stringify(r));
        // A result stored in full (rows written before) comes back unchanged.
        expect(expandStoredResult(JSON.parse(JSON.stringify(r)))).toEqual(JSON.parse(JSON.stringify(r)));
      }
    });
  }
});

describe('stored spectra', () => {
  it('keep null (non-finite) values, signed zeros and extremes exactly', () => {
    const valuesDb = [0, -0, null, -300.5, 1e-310, Number.MAX_VALUE, -12.345678901234567, null];
    const r = {
      method: 'mvdr',
      criteria: { logLikelihood: [], snapshotsUsed: 10 },
      uncertainty: null,
      spectrum: { kind: 'mvdr', startDeg: -90, stepDeg: 0.01, valuesDb },
    } as unknown as Parameters<typeof compactStoredResult>[0];
    const stored = JSON.parse(JSON.stringify(compactStoredResult(r)));
    expect(stored.spectrum.valuesF64.length).toBe(Math.ceil((8 * valuesDb.length) / 3) * 4);
    const back = expandStoredResult(stored).spectrum!.valuesDb;
    expect(back).toEqual(valuesDb);
    expect(Object.is(back[1], -0)).toBe(true);
  });
});
