/**
 * Dataset figures: power per channel, the covariance magnitude |R| as a
 * heatmap, and the covariance eigenvalues with the MDL and AIC source-count
 * choices (Wax & Kailath 1985, docs/conventions.md §3). Elements are numbered
 * from 1 on the axes.
 */
import { baseOption, fmt, type ChartHeading, type ChartOption, valueAxisX, valueAxisY } from './common';
import { ACCENT, INK } from './palette';

/** A channel more than this many dB below the median is drawn in coral. */
export const WEAK_CHANNEL_DB = 10;

export function channelPowerOption(powerDb: number[], heading: ChartHeading = {}): ChartOption {
  const finite = powerDb.filter((v) => v > -300);
  const max = Math.max(...finite, 0);
  const median = [...finite].sort((a, b) => a - b)[Math.floor(finite.length / 2)] ?? 0;
  // Whole multiples of 5 dB, so the end labels do not crowd the ticks.
  const lo = 5 * Math.floor((Math.min(...finite, median - 20) - 3) / 5);
  const hi = 5 * Math.ceil((max + 3) / 5);
  return {
    ...baseOption(heading),
    grid: { outerBoundsMode: 'none', left: 56, right: 12, top: heading.title ? 56 : 12, bottom: 40 },
    xAxis: {
      type: 'category',
      name: 'element',
      nameLocation: 'middle',
      nameGap: 26,
      data: powerDb.map((_, i) => String(i + 1)),
      axisLabel: { color: INK.text, fontSize: 10 },
      axisLine: { lineStyle: { color: INK.axis } },
    },
    yAxis: valueAxisY('mean |x|² (dB)', { min: lo, max: hi }),
    tooltip: {
      trigger: 'axis',
      confine: true,
      className: 'chart-tooltip',
      formatter: (p: unknown) => {
        const q = (Array.isArray(p) ? p[0] : p) as { dataIndex: number };
        const v = powerDb[q.dataIndex];
        const weak = v < median - WEAK_CHANNEL_DB;
        return `Element ${q.dataIndex + 1}: ${v > -300 ? `${v.toFixed(2)} dB` : 'no signal'}${weak ? '<br/>more than 10 dB below the median' : ''}`;
      },
    },
    series: [
      {
        type: 'bar',
        id: 'power',
        name: 'mean |x|²',
        barWidth: '70%',
        data: powerDb.map((v) => ({
          value: Math.max(v, lo),
          itemStyle: { color: v < median - WEAK_CHANNEL_DB ? ACCENT.coralLight : ACCENT.tealLight },
        })),
        markLine: {
          symbol: 'none',
          silent: true,
          data: [
            {
              yAxis: median,
              lineStyle: { color: INK.muted, type: 'dashed' },
              label: { formatter: 'median', color: INK.text, fontSize: 10, position: 'insideEndTop' },
            },
          ],
        },
      },
    ],
  };
}

/** |R[i,k]| scaled by the largest diagonal entry, shaded by its square root (teal ramp). */
export function covarianceOption(magnitude: number[][], heading: ChartHeading = {}): ChartOption {
  const m = magnitude.length;
  let max = 0;
  for (let i = 0; i < m; i++) max = Math.max(max, magnitude[i][i]);
  const data: [number, number, number, number][] = [];
  for (let i = 0; i < m; i++)
    for (let k = 0; k < m; k++)
      data.push([k, i, Math.min(1, Math.sqrt(magnitude[i][k] / (max || 1))), magnitude[i][k]]);
  const labels = Array.from({ length: m }, (_, i) => String(i + 1));
  const axis = {
    type: 'category' as const,
    data: labels,
    nameLocation: 'middle' as const,
    axisLabel: { color: INK.text, fontSize: 10 },
    axisLine: { lineStyle: { color: INK.axis } },
    splitArea: { show: false },
  };
  return {
    ...baseOption(heading),
    grid: { outerBoundsMode: 'none', left: 44, right: 12, top: heading.title ? 56 : 8, bottom: 40 },
    xAxis: { ...axis, name: `element k (1…${m})`, nameGap: 26 },
    yAxis: { ...axis, name: 'element i', nameGap: 28, inverse: true },
    visualMap: {
      show: false,
      min: 0,
      max: 1,
      dimension: 2,
      inRange: { color: ['#f7fafa', '#75cfbd', '#207b6d', '#0f5f64'] },
    },
    tooltip: {
      trigger: 'item',
      confine: true,
      className: 'chart-tooltip',
      formatter: (p: unknown) => {
        const v = (p as { value: [number, number, number, number] }).value;
        return `|R[${v[1] + 1},${v[0] + 1}]| = ${v[3].toPrecision(4)}`;
      },
    },
    series: [{ type: 'heatmap', id: 'covariance', name: '|R|', data, emphasis: { disabled: true }, progressive: 0 }],
  };
}

export interface EigenvalueInput {
  eigenvalues: number[];
  mdl: number[];
  aic: number[];
  mdlChoice: number;
  aicChoice: number;
  sourceCount?: number;
}

export function eigenvalueOption(input: EigenvalueInput, heading: ChartHeading = {}): ChartOption {
  const p = input.eigenvalues.length;
  const floor = (input.eigenvalues[0] || 1) * 1e-14;
  const signal = input.sourceCount ?? input.mdlChoice;
  const lines = [];
  if (input.mdlChoice > 0 && input.mdlChoice < p)
    lines.push({
      xAxis: input.mdlChoice + 0.5,
      lineStyle: { color: ACCENT.teal, type: 'dashed' as const, width: 1.4 },
      label: {
        formatter: `MDL: ${input.mdlChoice}`,
        color: ACCENT.teal,
        fontSize: 10,
        position: 'insideEndTop' as const,
      },
    });
  if (input.aicChoice > 0 && input.aicChoice < p && input.aicChoice !== input.mdlChoice)
    lines.push({
      xAxis: input.aicChoice + 0.5,
      lineStyle: { color: ACCENT.amber, type: 'dotted' as const, width: 1.6 },
      label: {
        formatter: `AIC: ${input.aicChoice}`,
        color: ACCENT.amber,
        fontSize: 10,
        position: 'insideEndTop' as const,
      },
    });
  return {
    ...baseOption(heading),
    grid: { outerBoundsMode: 'none', left: 60, right: 16, top: heading.title ? 56 : 14, bottom: 40 },
    xAxis: valueAxisX('eigenvalue index (descending)', {
      min: 0,
      max: p + 1,
      interval: p <= 32 ? 1 : Math.ceil(p / 16),
      splitLine: { show: false },
      axisLabel: {
        color: INK.text,
        fontSize: 10,
        formatter: (v: number) => (Number.isInteger(v) && v >= 1 && v <= p ? String(v) : ''),
      },
    }),
    yAxis: valueAxisY('eigenvalue (log scale)', {
      type: 'log',
      logBase: 10,
      nameGap: 46,
      axisLabel: { color: INK.text, fontSize: 10, formatter: (v: number) => `1e${Math.round(Math.log10(v))}` },
    }),
    tooltip: {
      trigger: 'item',
      confine: true,
      className: 'chart-tooltip',
      formatter: (q: unknown) => {
        const i = (q as { dataIndex: number }).dataIndex;
        return `λ${i + 1} = ${input.eigenvalues[i].toPrecision(5)}<br/>MDL(${i}) = ${input.mdl[i]?.toFixed(2) ?? '—'}, AIC(${i}) = ${input.aic[i]?.toFixed(2) ?? '—'}`;
      },
    },
    series: [
      {
        type: 'line',
        id: 'eigenvalues',
        name: 'eigenvalues',
        data: input.eigenvalues.map((v, i) => ({
          value: [i + 1, Math.max(v, floor)],
          itemStyle: { color: i < signal ? ACCENT.teal : INK.faint },
        })),
        symbol: 'circle',
        symbolSize: 7,
        lineStyle: { color: INK.text, width: 1.5 },
        emphasis: { scale: 1.4 },
        markLine: { symbol: 'none', silent: true, data: lines },
      },
    ],
  };
}

export { fmt };
