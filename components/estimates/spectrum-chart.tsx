'use client';

/**
 * Pseudo-spectra of a run on the full grid the run computed, opening zoomed on
 * the estimated bearings ("Full scan" shows −90…90°). The chart definition is
 * lib/charts/spectrum.ts, shared with exports.
 */
import { useMemo } from 'react';
import { Chart } from '@/components/charts/chart';
import { OWN_SPECTRUM, methodColour, spectrumFocus, spectrumOption, type SpectrumSeriesInput } from '@/lib/charts';

export function SpectrumChart({ series, exportName }: { series: SpectrumSeriesInput[]; exportName: string }) {
  const option = useMemo(() => spectrumOption({ series }), [series]);
  const focus = useMemo(() => {
    const f = spectrumFocus(series);
    return f ? { from: f.fromDeg, to: f.toDeg } : null;
  }, [series]);
  const zoom = useMemo(() => ({ x: true, initial: focus }), [focus]);
  return (
    <figure>
      <Chart
        option={option}
        height={320}
        ariaLabel="Pseudo-spectra"
        exportName={exportName}
        testIdPrefix="spectrum"
        zoom={zoom}
        zoomPresets={[
          ...(focus ? [{ label: 'Bearings', window: focus, testId: 'spectrum-zoom-bearings' }] : []),
          { label: 'Full scan', window: null, testId: 'spectrum-full-scan' },
        ]}
      />
      <figcaption className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-600">
        {series.map((s) => (
          <span key={s.method} className="flex items-center gap-1.5">
            <span
              aria-hidden
              className="inline-block h-0 w-4 border-t-2"
              style={{
                borderColor: methodColour(s.method),
                borderTopStyle: OWN_SPECTRUM.has(s.method) ? 'solid' : 'dashed',
              }}
            />
            {s.label}
            {s.spectrum && !OWN_SPECTRUM.has(s.method) ? (
              <span className="text-ink-400">(dashed: the MUSIC spectrum of its signal subspace)</span>
            ) : null}
          </span>
        ))}
        <span className="text-ink-400">Ticks at the top: bearings, with ±1σ bars where the run has a bound.</span>
      </figcaption>
    </figure>
  );
}
