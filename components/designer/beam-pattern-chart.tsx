'use client';

/**
 * Beam pattern in a Cartesian view (level in dB against bearing) or a polar
 * view (the front half-plane, broadside up), defined in lib/charts/beam-pattern.ts
 * (the hand-off bundle draws the same definition on the server). The −3 dB level, the steering direction and
 * any visible grating lobes are marked. Steering and taper are set here.
 */
import { useMemo, useState } from 'react';
import type { DesignerAction, DesignerDraft } from '@/lib/designer/state';
import type { DesignFigures, PatternData } from '@/lib/designer/analysis';
import { fileSlug, patternCsv } from '@/lib/designer/export';
import { Chart } from '@/components/charts/chart';
import { beamPatternOption } from '@/lib/charts';
import { cn } from '@/lib/client/cn';

export interface BeamPatternChartProps {
  draft: DesignerDraft;
  pattern: PatternData;
  figures: DesignFigures;
  dispatch: (action: DesignerAction) => void;
  readOnly?: boolean;
}

export function BeamPatternChart({ draft, pattern, figures, dispatch, readOnly = false }: BeamPatternChartProps) {
  const [viewKind, setViewKind] = useState<'cartesian' | 'polar'>('cartesian');
  const [floorDb, setFloorDb] = useState(-60);
  const option = useMemo(
    () =>
      beamPatternOption({
        thetaDeg: pattern.thetaDeg,
        valuesDb: pattern.valuesDb,
        gratingLobesDeg: pattern.gratingLobesDeg,
        steerDeg: draft.steerDeg,
        floorDb,
        view: viewKind,
        elements: draft.elements,
      }),
    [pattern, draft.steerDeg, draft.elements, floorDb, viewKind],
  );
  const zoom = useMemo(() => (viewKind === 'cartesian' ? { x: true, y: true } : false), [viewKind]);

  const csv = () =>
    patternCsv(pattern, {
      array: draft.name,
      elements: draft.elements,
      spacing_wavelengths: figures.spacingWavelengths,
      steer_deg: draft.steerDeg,
      taper: draft.taper.kind === 'chebyshev' ? `chebyshev ${draft.taper.sidelobeDb} dB` : draft.taper.kind,
      enabled_elements: draft.elementStates.filter((e) => e.enabled).length,
      normalisation: 'dB relative to the pattern peak',
    });

  const toggle = 'rounded px-2 py-0.5 text-xs font-medium ring-1 ring-inset';

  return (
    <div className="space-y-3" data-testid="beam-pattern">
      <div className="flex flex-wrap items-end gap-x-5 gap-y-2 text-sm">
        <div className="flex items-center gap-1" role="group" aria-label="Pattern view">
          {(['cartesian', 'polar'] as const).map((k) => (
            <button
              key={k}
              type="button"
              aria-pressed={viewKind === k}
              onClick={() => setViewKind(k)}
              data-testid={`pattern-view-${k}`}
              className={cn(
                toggle,
                viewKind === k ? 'bg-ink-800 text-white ring-ink-800' : 'text-ink-600 ring-ink-200 hover:bg-ink-50',
              )}
            >
              {k === 'cartesian' ? 'Cartesian' : 'Polar'}
            </button>
          ))}
        </div>
        <label className="flex items-center gap-2">
          <span className="text-ink-600">Steer</span>
          <input
            type="range"
            min={-90}
            max={90}
            step={0.5}
            value={draft.steerDeg}
            disabled={readOnly}
            onChange={(e) => dispatch({ type: 'setSteer', steerDeg: Number(e.target.value) })}
            aria-label="Steering angle in degrees"
            data-testid="steer-slider"
            className="w-40 accent-glass-600"
          />
          <span className="w-14 tabular text-ink-800">{draft.steerDeg.toFixed(1)}°</span>
        </label>
        <label className="flex items-center gap-2">
          <span className="text-ink-600">Taper</span>
          <select
            value={draft.taper.kind}
            disabled={readOnly}
            onChange={(e) => {
              const kind = e.target.value as DesignerDraft['taper']['kind'];
              dispatch({ type: 'setTaper', taper: kind === 'chebyshev' ? { kind, sidelobeDb: 30 } : { kind } });
            }}
            data-testid="taper-select"
            className="rounded-md border border-ink-200 bg-white px-2 py-1"
          >
            <option value="uniform">Uniform</option>
            <option value="hann">Hann</option>
            <option value="hamming">Hamming</option>
            <option value="chebyshev">Dolph–Chebyshev</option>
          </select>
        </label>
        {draft.taper.kind === 'chebyshev' ? (
          <label className="flex items-center gap-2">
            <span className="text-ink-600">Sidelobes</span>
            <input
              type="number"
              min={10}
              max={120}
              step={1}
              value={draft.taper.sidelobeDb}
              disabled={readOnly}
              onChange={(e) => {
                const v = Number(e.target.value);
                if (Number.isFinite(v) && v >= 10 && v <= 120)
                  dispatch({ type: 'setTaper', taper: { kind: 'chebyshev', sidelobeDb: v } });
              }}
              className="w-16 rounded-md border border-ink-200 px-2 py-1"
              aria-label="Chebyshev sidelobe level in dB below the main lobe"
            />
            <span className="text-ink-500">dB down</span>
          </label>
        ) : null}
        <label className="flex items-center gap-2">
          <span className="text-ink-600">Floor</span>
          <select
            value={floorDb}
            onChange={(e) => setFloorDb(Number(e.target.value))}
            className="rounded-md border border-ink-200 bg-white px-2 py-1"
          >
            {[-40, -60, -80, -100].map((v) => (
              <option key={v} value={v}>
                {v} dB
              </option>
            ))}
          </select>
        </label>
      </div>

      <Chart
        option={option}
        height={viewKind === 'cartesian' ? 300 : 350}
        ariaLabel={`Beam pattern, ${viewKind} view, steered to ${draft.steerDeg.toFixed(1)} degrees`}
        exportName={`${fileSlug(draft.name)}-beam-pattern`}
        testIdPrefix="pattern"
        csv={csv}
        zoom={zoom}
        dataAttributes={{ 'data-grating-lobes': pattern.gratingLobesDeg.map((t) => t.toFixed(3)).join(' ') }}
      />
      <p className="text-xs text-ink-500">
        Dashed orange: −3 dB (half power). Dark dashed line: steering direction.
        {pattern.gratingLobesDeg.length ? (
          <span className="font-medium text-coral-600" data-testid="grating-lobe-note">
            {' '}
            Grating lobe{pattern.gratingLobesDeg.length > 1 ? 's' : ''} at{' '}
            {pattern.gratingLobesDeg.map((t) => `${t.toFixed(1)}°`).join(', ')}: a source there is indistinguishable
            from one at the steering direction.
          </span>
        ) : (
          ' No grating lobe in view.'
        )}
      </p>
    </div>
  );
}
