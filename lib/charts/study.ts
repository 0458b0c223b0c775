/**
 * Study charts: RMSE per method (solid, with markers) and √CRB (dashed, the
 * stochastic bound) against the swept variable, both axes logarithmic (SNR is
 * already logarithmic in dB, so its axis is linear in dB); and the probability
 * that every source is resolved. Colours come from the one method map.
 */
import type { LineSeriesOption } from 'echarts';
import {
  baseOption,
  gridTop,
  legend,
  orGap,
  valueAxisX,
  valueAxisY,
  type ChartHeading,
  type ChartOption,
  fmt,
} from './common';
import { INK, methodColour } from './palette';

export interface StudyPoint {
  value: number;
  crbRmsDeg: number;
  methods: { method: string; rmseDeg: number; resolutionProbability: number | null }[];
}

export interface StudyChartInput {
  variable: string;
  points: StudyPoint[];
  /** Axis name of the swept variable. */
  axisLabel: string;
  /** Display name per method id. */
  labels: Record<string, string>;
}

export const CRB_LABEL = '√CRB (stochastic)';

function xAxisFor(input: StudyChartInput, xs: number[]) {
  const snr = input.variable === 'snr';
  return valueAxisX(input.axisLabel, {
    type: snr ? 'value' : 'log',
    logBase: 10,
    min: Math.min(...xs),
    max: Math.max(...xs) === Math.min(...xs) ? Math.min(...xs) * 10 : Math.max(...xs),
    // Labels at the swept values themselves (a log axis would label only decades).
    axisLabel: {
      color: INK.text,
      fontSize: 10,
      customValues: xs,
      formatter: snr ? '{value} dB' : (v: number) => fmt(v, 3),
    },
    axisTick: { customValues: xs, lineStyle: { color: INK.axis } },
  });
}

const sortPoints = (points: StudyPoint[]) => points.slice().sort((a, b) => a.value - b.value);
const methodsOf = (points: StudyPoint[]) => points[0]?.methods.map((m) => m.method) ?? [];

export function rmseOption(input: StudyChartInput, heading: ChartHeading = {}): ChartOption {
  const sorted = sortPoints(input.points);
  const xs = sorted.map((p) => p.value);
  const methods = methodsOf(sorted);
  const positive = (v: number) => (v > 0 ? v : NaN);
  const series: LineSeriesOption[] = methods.map((m, mi) => ({
    type: 'line',
    id: `rmse:${m}`,
    name: input.labels[m] ?? m,
    data: sorted.map((p) => [p.value, orGap(positive(p.methods[mi].rmseDeg))]),
    symbol: 'circle',
    symbolSize: 6,
    lineStyle: { color: methodColour(m), width: 1.8 },
    itemStyle: { color: methodColour(m) },
  }));
  series.push({
    type: 'line',
    id: 'crb',
    name: CRB_LABEL,
    data: sorted.map((p) => [p.value, orGap(positive(p.crbRmsDeg))]),
    symbol: 'none',
    lineStyle: { color: methodColour('crb'), width: 1.6, type: 'dashed' },
    itemStyle: { color: methodColour('crb') },
  });
  return {
    ...baseOption(heading),
    legend: legend([...methods.map((m) => input.labels[m] ?? m), CRB_LABEL]),
    grid: { outerBoundsMode: 'none', left: 64, right: 20, top: gridTop(heading, true), bottom: 42 },
    xAxis: xAxisFor(input, xs),
    yAxis: valueAxisY('RMSE (degrees, log scale)', {
      type: 'log',
      logBase: 10,
      nameGap: 46,
      axisLabel: { color: INK.text, fontSize: 10, formatter: (v: number) => `${fmt(v, 2)}°` },
    }),
    tooltip: {
      trigger: 'axis',
      confine: true,
      className: 'chart-tooltip',
      valueFormatter: (v: unknown) => (typeof v === 'number' ? `${v.toPrecision(3)}°` : '—'),
    },
    series,
  };
}

export function resolutionOption(input: StudyChartInput, heading: ChartHeading = {}): ChartOption {
  const sorted = sortPoints(input.points);
  const xs = sorted.map((p) => p.value);
  const methods = methodsOf(sorted);
  return {
    ...baseOption(heading),
    legend: legend(methods.map((m) => input.labels[m] ?? m)),
    grid: { outerBoundsMode: 'none', left: 64, right: 20, top: gridTop(heading, true), bottom: 42 },
    xAxis: xAxisFor(input, xs),
    yAxis: valueAxisY('P(resolved)', { min: 0, max: 1, interval: 0.25 }),
    tooltip: {
      trigger: 'axis',
      confine: true,
      className: 'chart-tooltip',
      valueFormatter: (v: unknown) => (typeof v === 'number' ? v.toFixed(3) : '—'),
    },
    series: methods.map((m, mi) => ({
      type: 'line',
      id: `resolution:${m}`,
      name: input.labels[m] ?? m,
      data: sorted.map((p) => [p.value, p.methods[mi].resolutionProbability ?? 0]),
      symbol: 'circle',
      symbolSize: 5,
      lineStyle: { color: methodColour(m), width: 1.8 },
      itemStyle: { color: methodColour(m) },
    })),
  };
}
