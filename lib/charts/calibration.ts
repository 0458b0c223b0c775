/**
 * Calibration charts: one bar per element (its estimated gain in dB, or phase in
 * degrees, relative to element 1) with ±1σ error bars drawn by a custom series,
 * and, when given, the revision's current values as hollow markers for comparison.
 */
import type { CustomSeriesRenderItem } from 'echarts';
import { baseOption, fmt, gridTop, legend, valueAxisY, type ChartHeading, type ChartOption } from './common';
import { ACCENT, INK } from './palette';

export interface CalibrationBarsInput {
  /** 'gain' (dB) or 'phase' (degrees). */
  quantity: 'gain' | 'phase';
  values: number[];
  stds: number[];
  /** The revision's current values (before), drawn as markers; optional. */
  current?: number[];
}

export const CALIBRATION_LABELS = {
  estimate: 'estimate ± 1σ',
  current: 'current revision',
};

export function calibrationBarsOption(input: CalibrationBarsInput, heading: ChartHeading = {}): ChartOption {
  const unit = input.quantity === 'gain' ? 'dB' : '°';
  const categories = input.values.map((_, i) => String(i + 1));
  const renderError: CustomSeriesRenderItem = (_params, api) => {
    const i = Number(api.value(0));
    const v = Number(api.value(1));
    const sd = Number(api.value(2));
    if (!(sd > 0)) return { type: 'group', children: [] } as ReturnType<CustomSeriesRenderItem>;
    const [x, yTop] = api.coord([i, v + sd]);
    const [, yBottom] = api.coord([i, v - sd]);
    const w = 5;
    const style = { stroke: INK.strong, lineWidth: 1.2 };
    return {
      type: 'group',
      children: [
        { type: 'line', shape: { x1: x, y1: yTop, x2: x, y2: yBottom }, style },
        { type: 'line', shape: { x1: x - w, y1: yTop, x2: x + w, y2: yTop }, style },
        { type: 'line', shape: { x1: x - w, y1: yBottom, x2: x + w, y2: yBottom }, style },
      ],
    } as ReturnType<CustomSeriesRenderItem>;
  };
  const hasCurrent = Boolean(input.current);
  return {
    ...baseOption(heading),
    legend: legend([CALIBRATION_LABELS.estimate, ...(hasCurrent ? [CALIBRATION_LABELS.current] : [])]),
    grid: { left: 52, right: 16, top: gridTop(heading, true), bottom: 40 },
    xAxis: {
      type: 'category',
      data: categories,
      name: 'element',
      nameLocation: 'middle',
      nameGap: 26,
      nameTextStyle: { color: INK.text, fontSize: 11 },
      axisLine: { lineStyle: { color: INK.axis } },
      axisLabel: { color: INK.text, fontSize: 10 },
    },
    yAxis: valueAxisY(input.quantity === 'gain' ? 'gain re element 1 (dB)' : 'phase re element 1 (degrees)'),
    tooltip: {
      trigger: 'axis',
      className: 'chart-tooltip',
      confine: true,
      formatter: ((items: { dataIndex: number }[]) => {
        const i = items[0]?.dataIndex ?? 0;
        const cur = input.current ? `<br/>current ${fmt(input.current[i], 4)} ${unit}` : '';
        return `element ${i + 1}<br/>${fmt(input.values[i], 4)} ± ${fmt(input.stds[i], 2)} ${unit}${cur}`;
      }) as never,
    },
    series: [
      {
        type: 'bar',
        name: CALIBRATION_LABELS.estimate,
        data: input.values,
        barMaxWidth: 28,
        itemStyle: { color: input.quantity === 'gain' ? ACCENT.tealLight : ACCENT.amber },
      },
      {
        type: 'custom',
        name: CALIBRATION_LABELS.estimate,
        renderItem: renderError,
        data: input.values.map((v, i) => [i, v, input.stds[i]]),
        encode: { x: 0, y: [1] },
        silent: true,
        tooltip: { show: false },
        z: 3,
      },
      ...(input.current
        ? [
            {
              type: 'scatter' as const,
              name: CALIBRATION_LABELS.current,
              data: input.current,
              symbol: 'emptyCircle',
              symbolSize: 8,
              itemStyle: { color: INK.strong },
              z: 4,
            },
          ]
        : []),
    ],
  };
}
