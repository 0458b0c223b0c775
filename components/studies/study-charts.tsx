'use client';

/**
 * Study charts: RMSE per method and √CRB against the swept variable (log–log),
 * and the resolution probability. Definitions in lib/charts/study.ts; method
 * colours from the one map in lib/charts/palette.ts.
 */
import { useMemo } from 'react';
import { Chart } from '@/components/charts/chart';
import { methodColour, resolutionOption, rmseOption, type StudyPoint } from '@/lib/charts';
import { METHOD_LABELS, VARIABLE_LABELS } from './labels';

export type ChartPoint = StudyPoint;

const inputOf = (variable: string, points: StudyPoint[]) => ({
  variable,
  points,
  axisLabel: VARIABLE_LABELS[variable]?.axis ?? variable,
  labels: METHOD_LABELS,
});

/** RMSE per method (solid, markers) and √CRB (dashed) against the swept variable, both axes logarithmic. */
export function RmseChart({
  variable,
  points,
  slopes,
  exportName = 'study-rmse',
}: {
  variable: string;
  points: ChartPoint[];
  slopes: { method: string; slope: number | null }[];
  exportName?: string;
}) {
  const option = useMemo(() => rmseOption(inputOf(variable, points)), [variable, points]);
  const methods = points[0]?.methods.map((m) => m.method) ?? [];
  const slopeOf = (m: string) => slopes.find((s) => s.method === m)?.slope;
  return (
    <figure>
      <Chart
        option={option}
        height={320}
        ariaLabel="RMSE and square root of the Cramér–Rao bound against the swept variable, log–log"
        exportName={exportName}
        testIdPrefix="study-rmse"
        zoom={{ x: true, y: true }}
      />
      <figcaption className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-600">
        {methods.map((m) => (
          <span key={m} className="flex items-center gap-1.5">
            <span aria-hidden className="inline-block h-0 w-4 border-t-2" style={{ borderColor: methodColour(m) }} />
            {METHOD_LABELS[m] ?? m}
            <span className="text-ink-400 tabular">slope {slopeOf(m) != null ? slopeOf(m)!.toFixed(2) : 'n/a'}</span>
          </span>
        ))}
        <span className="flex items-center gap-1.5">
          <span aria-hidden className="inline-block h-0 w-4 border-t-2 border-dashed border-ink-900" />
          √CRB (stochastic){' '}
          <span className="text-ink-400 tabular">
            slope {slopeOf('crb') != null ? slopeOf('crb')!.toFixed(2) : 'n/a'}
          </span>
        </span>
      </figcaption>
    </figure>
  );
}

/** Probability that every source is resolved, per method, against the swept variable (log x). */
export function ResolutionChart({
  variable,
  points,
  exportName = 'study-resolution',
}: {
  variable: string;
  points: ChartPoint[];
  exportName?: string;
}) {
  const option = useMemo(() => resolutionOption(inputOf(variable, points)), [variable, points]);
  return (
    <figure>
      <Chart
        option={option}
        height={240}
        ariaLabel="Resolution probability against the swept variable"
        exportName={exportName}
        testIdPrefix="study-resolution"
        zoom={{ x: true }}
      />
    </figure>
  );
}
