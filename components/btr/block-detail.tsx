'use client';
import { useMemo } from 'react';
import { Chart } from '@/components/charts/chart';
import { FormMessage } from '@/components/ui/field';
import { useApi } from '@/lib/client/use-api';
import { blockSpectrumSeries, clockLabel, spectrumOption } from '@/lib/charts';
import { BTR_METHOD_LABELS, type BtrBlockDetail } from './types';

/**
 * One block of a record: its wideband spectrum (normalised to its peak) with the
 * block's bearings ±1σ ticked over it, and the bearings in a list.
 */
export function BlockDetail({ recordId, index, method }: { recordId: number; index: number; method: string }) {
  const { data, error, isLoading } = useApi<BtrBlockDetail>(`/api/v1/bearing-time-records/${recordId}/blocks/${index}`);
  const label = BTR_METHOD_LABELS[method] ?? method;
  const option = useMemo(
    () => (data ? spectrumOption({ series: [blockSpectrumSeries(data, method, label)], floorDb: -40 }) : null),
    [data, method, label],
  );
  if (error) return <FormMessage tone="error">{error.message}</FormMessage>;
  if (isLoading || !data || !option) return <p className="text-sm text-ink-500">Loading block {index + 1}…</p>;
  return (
    <div className="grid gap-4 lg:grid-cols-[minmax(0,1fr)_16rem]" data-testid="block-detail" data-block={index}>
      <Chart
        option={option}
        height={260}
        ariaLabel={`Wideband spectrum of block ${index + 1}`}
        exportName={`bearing-time-record-${recordId}-block-${index + 1}`}
        testIdPrefix="block-spectrum"
        zoom={{}}
      />
      <div className="text-sm">
        <p className="font-medium text-ink-800">
          Block {index + 1}: {clockLabel(data.startS)} – {clockLabel(data.endS)}
        </p>
        <p className="text-xs text-ink-500">
          {data.startS.toFixed(2)} s to {data.endS.toFixed(2)} s
          {data.sourceCount !== undefined ? `, K = ${data.sourceCount}` : ''}
        </p>
        {data.bearingsDeg.length ? (
          <ul className="mt-2 space-y-1 font-mono text-xs tabular" aria-label="Block bearings">
            {data.bearingsDeg.map((b, i) => (
              <li key={i} data-testid="block-bearing" data-bearing={b} data-std={data.stdDeg[i] ?? ''}>
                {b.toFixed(2)}° ± {Number.isFinite(data.stdDeg[i]) ? data.stdDeg[i].toFixed(2) : '—'}° (1σ)
              </li>
            ))}
          </ul>
        ) : (
          <p className="mt-2 text-xs text-ink-500">No bearing in this block.</p>
        )}
        {data.warnings?.length ? (
          <ul className="mt-2 list-disc pl-4 text-xs text-amber-700">
            {data.warnings.map((w) => (
              <li key={w}>{w}</li>
            ))}
          </ul>
        ) : null}
        <p className="mt-3 text-xs text-ink-500">
          ±1σ is the wideband Cramér–Rao bound at the estimated bearings and powers, summed over the bins: a floor on
          the spread of an unbiased estimate, not a guarantee for this one.
        </p>
      </div>
    </div>
  );
}
