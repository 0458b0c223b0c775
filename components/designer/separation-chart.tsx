'use client';

/**
 * Separation versus aperture: the Rayleigh gap 1/(M·d) and Smith's statistical
 * resolution limit (lib/doa/bounds/resolution.ts) against aperture, on a log separation
 * axis, with the current array as a vertical marker and the planned source
 * pairs as points. Pairs below the gap are flagged here and listed with advice.
 * The chart definition is lib/charts/separation.ts (shared with the hand-off bundle).
 */
import { useMemo, useState } from 'react';
import type { DesignerAction, DesignerDraft } from '@/lib/designer/state';
import type { PairAdvice } from '@/lib/designer/analysis';
import type { SeparationChart as Curves } from '@/lib/doa/bounds';
import { columnsCsv, fileSlug } from '@/lib/designer/export';
import { Chart } from '@/components/charts/chart';
import { designSeparationInput, separationOption, separationPairPoints } from '@/lib/charts';
import { cn } from '@/lib/client/cn';

export interface SeparationChartProps {
  draft: DesignerDraft;
  curves: Curves;
  pairs: PairAdvice[];
  spacingWavelengths: number;
  lookDeg: number;
  dispatch: (action: DesignerAction) => void;
  readOnly?: boolean;
}

const zoom = { x: true, y: true };

export function SeparationChart({
  draft,
  curves,
  pairs,
  spacingWavelengths: d,
  lookDeg,
  dispatch,
  readOnly = false,
}: SeparationChartProps) {
  const [xKind, setXKind] = useState<'elements' | 'length'>('elements');
  const [yKind, setYKind] = useState<'deg' | 'u'>('deg');

  const chartInput = useMemo(
    () =>
      designSeparationInput({
        curves,
        pairs,
        elements: draft.elements,
        spacingWavelengths: d,
        lookDeg,
        snrDb: draft.snrDb,
        snapshots: draft.snapshots,
        xKind,
        yKind,
      }),
    [curves, pairs, xKind, yKind, draft.elements, draft.snrDb, draft.snapshots, d, lookDeg],
  );
  const option = useMemo(() => separationOption(chartInput), [chartInput]);
  // The points the chart draws, for tests: "i-j:below" per pair.
  const drawnPairs = separationPairPoints(chartInput)
    .map((p) => `${p.i}-${p.j}:${p.belowResolvableGap ? 'below' : 'above'}`)
    .join(' ');

  const flagged = pairs.filter((p) => p.belowResolvableGap);
  const toggle = 'rounded px-2 py-0.5 text-xs font-medium ring-1 ring-inset';

  const csv = () =>
    columnsCsv({
      elements: curves.elements,
      aperture_wavelengths: curves.apertureWavelengths,
      rayleigh_gap_u: curves.rayleighGapU,
      rayleigh_gap_deg_at_look: curves.rayleighGapDeg,
      statistical_limit_u: curves.statisticalLimitU,
      statistical_limit_deg_at_look: curves.statisticalLimitDeg,
    });

  const numberInput = 'w-24 rounded-md border border-ink-200 px-2 py-1 text-sm';

  return (
    <div className="space-y-3" data-testid="separation-chart">
      <div className="flex flex-wrap items-end gap-x-5 gap-y-2 text-sm">
        <div className="flex items-center gap-1" role="group" aria-label="Horizontal axis">
          {(['elements', 'length'] as const).map((k) => (
            <button
              key={k}
              type="button"
              aria-pressed={xKind === k}
              onClick={() => setXKind(k)}
              data-testid={`sep-x-${k}`}
              className={cn(
                toggle,
                xKind === k ? 'bg-ink-800 text-white ring-ink-800' : 'text-ink-600 ring-ink-200 hover:bg-ink-50',
              )}
            >
              {k === 'elements' ? 'Elements' : 'Length in λ'}
            </button>
          ))}
        </div>
        <div className="flex items-center gap-1" role="group" aria-label="Vertical axis">
          {(['deg', 'u'] as const).map((k) => (
            <button
              key={k}
              type="button"
              aria-pressed={yKind === k}
              onClick={() => setYKind(k)}
              data-testid={`sep-y-${k}`}
              className={cn(
                toggle,
                yKind === k ? 'bg-ink-800 text-white ring-ink-800' : 'text-ink-600 ring-ink-200 hover:bg-ink-50',
              )}
            >
              {k === 'deg' ? 'Degrees' : 'Δu'}
            </button>
          ))}
        </div>
        <label className="flex items-center gap-2">
          <span className="text-ink-600">SNR per element</span>
          <input
            type="number"
            step={1}
            className={numberInput}
            value={draft.snrDb}
            disabled={readOnly}
            data-testid="sep-snr"
            aria-label="SNR per element in dB"
            onChange={(e) => e.target.value !== '' && dispatch({ type: 'setSnr', snrDb: Number(e.target.value) })}
          />
          <span className="text-ink-500">dB</span>
        </label>
        <label className="flex items-center gap-2">
          <span className="text-ink-600">Snapshots</span>
          <input
            type="number"
            step={1}
            min={1}
            className={numberInput}
            value={draft.snapshots}
            disabled={readOnly}
            data-testid="sep-snapshots"
            aria-label="Number of snapshots"
            onChange={(e) => dispatch({ type: 'setSnapshots', snapshots: Number(e.target.value) })}
          />
        </label>
      </div>

      <Chart
        option={option}
        height={340}
        ariaLabel="Resolvable separation against aperture"
        exportName={`${fileSlug(draft.name)}-separation`}
        testIdPrefix="separation"
        csv={csv}
        zoom={zoom}
        dataAttributes={{ 'data-pairs': drawnPairs, 'data-current-x': String(chartInput.currentX) }}
      />
      <p className="text-xs text-ink-500">
        Below the solid line a beamformer merges two sources into one peak. Below the dashed line (Smith 2005: the
        separation equals its own Cramér–Rao standard deviation) no unbiased method can be expected to separate them at
        this SNR and snapshot count. Both assume the full uniform array of {draft.elements} elements at {d.toFixed(4)}{' '}
        λ; the chart ignores disabled elements and the taper.
      </p>

      <div>
        <h3 className="text-sm font-semibold">Planned source pairs</h3>
        {pairs.length === 0 ? (
          <p className="mt-1 text-sm text-ink-500">
            Add two or more source arrows on the canvas to check whether they can be told apart.
          </p>
        ) : (
          <ul className="mt-2 space-y-2" data-testid="pair-list">
            {pairs.map((p) => (
              <li
                key={`${p.i}-${p.j}`}
                data-testid="pair-item"
                data-pair={`${p.i}-${p.j}`}
                data-verdict={p.verdict}
                data-below-gap={p.belowResolvableGap ? 'true' : 'false'}
                data-separation-u={String(p.separationU)}
                className={cn(
                  'rounded-md border px-3 py-2 text-sm',
                  p.verdict === 'resolvable'
                    ? 'border-glass-200 bg-glass-50 text-glass-800'
                    : p.verdict === 'needs-high-resolution'
                      ? 'border-amber-300 bg-amber-50 text-amber-700'
                      : 'border-coral-500/40 bg-coral-50 text-coral-700',
                )}
              >
                <p>
                  <strong className="font-semibold">
                    {p.verdict === 'resolvable'
                      ? 'Resolvable.'
                      : p.verdict === 'needs-high-resolution'
                        ? 'Below the Rayleigh gap.'
                        : p.verdict === 'coincident'
                          ? 'Same direction.'
                          : 'Below the resolvable gap and the statistical limit.'}
                  </strong>{' '}
                  {p.outcome}
                </p>
                {p.fixes.length ? (
                  <ul className="mt-1 list-disc pl-5 text-xs">
                    {p.fixes.map((f) => (
                      <li key={f}>{f}</li>
                    ))}
                  </ul>
                ) : null}
              </li>
            ))}
          </ul>
        )}
        {flagged.length ? (
          <p role="status" className="mt-2 text-xs text-ink-600" data-testid="pair-flag-count">
            {flagged.length} of {pairs.length} pair{pairs.length === 1 ? '' : 's'} below the resolvable gap.
          </p>
        ) : null}
      </div>
    </div>
  );
}
