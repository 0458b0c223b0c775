/**
 * Beam pattern of an array design: level in dB re the peak against bearing,
 * in a Cartesian view or a polar view of the front half-plane (broadside up,
 * element 1 to the left). The −3.0103 dB (half-power) level, the steering
 * direction and any grating lobes in view are marked.
 *
 * Angles are degrees from broadside (docs/conventions.md §1); levels below the
 * floor are drawn on the floor.
 */
import type { LineSeriesOption } from 'echarts';
import {
  baseOption,
  degreeLabel,
  fmt,
  gridTop,
  valueAxisX,
  valueAxisY,
  type ChartHeading,
  type ChartOption,
} from './common';
import { ACCENT, INK } from './palette';

export const HALF_POWER_DB = -3.0103;

export interface BeamPatternInput {
  thetaDeg: ArrayLike<number>;
  valuesDb: ArrayLike<number>;
  gratingLobesDeg: number[];
  steerDeg: number;
  floorDb: number;
  view: 'cartesian' | 'polar';
  /** Number of elements, for the polar view's axis labels. */
  elements: number;
}

function points(input: BeamPatternInput): [number, number][] {
  const out: [number, number][] = new Array(input.thetaDeg.length);
  for (let i = 0; i < input.thetaDeg.length; i++)
    out[i] = [input.thetaDeg[i], Math.max(input.floorDb, Math.min(0, input.valuesDb[i]))];
  return out;
}

const patternTooltip = {
  trigger: 'axis' as const,
  confine: true,
  className: 'chart-tooltip',
  valueFormatter: (v: unknown) => `${Number(v).toFixed(2)} dB`,
};

export function beamPatternOption(input: BeamPatternInput, heading: ChartHeading = {}): ChartOption {
  return input.view === 'polar' ? polarOption(input, heading) : cartesianOption(input, heading);
}

function cartesianOption(input: BeamPatternInput, heading: ChartHeading): ChartOption {
  const vertical = (x: number, colour: string, type: 'dashed' | 'dotted', label: string) => ({
    xAxis: x,
    lineStyle: { color: colour, type, width: 1.5 },
    label: { formatter: label, color: colour, fontSize: 10, position: 'insideEndTop' as const },
  });
  return {
    ...baseOption(heading),
    grid: { outerBoundsMode: 'none', left: 56, right: 16, top: gridTop(heading, false), bottom: 40 },
    xAxis: valueAxisX('bearing from broadside (degrees)', {
      min: -90,
      max: 90,
      axisLabel: { color: INK.text, fontSize: 10, formatter: degreeLabel },
    }),
    yAxis: valueAxisY('level, dB re peak', { min: input.floorDb, max: 0, interval: 10 }),
    tooltip: {
      ...patternTooltip,
      axisPointer: { type: 'line' },
      formatter: (p: unknown) => {
        const q = (Array.isArray(p) ? p[0] : p) as { value: [number, number] };
        return `θ = ${q.value[0].toFixed(1)}°<br/>${q.value[1].toFixed(2)} dB re peak`;
      },
    },
    series: [
      {
        type: 'line',
        id: 'pattern',
        name: 'Beam pattern',
        data: points(input),
        showSymbol: false,
        symbol: 'none',
        lineStyle: { color: ACCENT.teal, width: 1.6 },
        itemStyle: { color: ACCENT.teal },
        areaStyle: { color: ACCENT.tealFill, origin: 'start' },
        emphasis: { disabled: true },
        markLine: {
          symbol: 'none',
          silent: true,
          data: [
            {
              yAxis: HALF_POWER_DB,
              lineStyle: { color: ACCENT.amber, type: 'dashed', width: 1.2 },
              label: { formatter: '−3 dB', color: ACCENT.amber, fontSize: 10, position: 'insideEndTop' },
            },
            vertical(input.steerDeg, ACCENT.steer, 'dashed', `steer ${fmt(input.steerDeg, 3)}°`),
            ...input.gratingLobesDeg.map((g) => vertical(g, ACCENT.coral, 'dotted', `grating lobe ${g.toFixed(1)}°`)),
          ],
        },
      } satisfies LineSeriesOption,
    ],
  };
}

function polarOption(input: BeamPatternInput, heading: ChartHeading): ChartOption {
  const ray = (theta: number) => [
    [input.floorDb, theta],
    [0, theta],
  ];
  const halfPower = Array.from(input.thetaDeg, (t) => [HALF_POWER_DB, t]);
  const line = (
    id: string,
    name: string,
    data: number[][],
    colour: string,
    type: 'solid' | 'dashed' | 'dotted',
    width = 1.4,
  ): LineSeriesOption => ({
    type: 'line',
    id,
    name,
    coordinateSystem: 'polar',
    data,
    showSymbol: false,
    symbol: 'none',
    lineStyle: { color: colour, type, width },
    itemStyle: { color: colour },
    emphasis: { disabled: true },
    silent: true,
    tooltip: { show: false },
  });
  return {
    ...baseOption(heading),
    polar: { center: ['50%', '90%'], radius: '150%' },
    angleAxis: {
      type: 'value',
      min: -90,
      max: 90,
      startAngle: 180,
      endAngle: 0,
      clockwise: true,
      interval: 30,
      axisLabel: { color: INK.text, fontSize: 10, formatter: '{value}°' },
      axisLine: { lineStyle: { color: INK.axis } },
      splitLine: { show: true, lineStyle: { color: INK.grid } },
    },
    radiusAxis: {
      type: 'value',
      min: input.floorDb,
      max: 0,
      interval: 10,
      axisLabel: { color: INK.text, fontSize: 9 },
      axisLine: { lineStyle: { color: INK.axis } },
      splitLine: { lineStyle: { color: INK.grid } },
    },
    graphic: [
      { type: 'text', left: 12, bottom: 8, style: { text: 'array axis (element 1)', fill: INK.text, fontSize: 10 } },
      {
        type: 'text',
        right: 12,
        bottom: 8,
        style: { text: `element ${input.elements}`, fill: INK.text, fontSize: 10 },
      },
    ],
    tooltip: {
      trigger: 'item',
      confine: true,
      className: 'chart-tooltip',
      formatter: (p: unknown) => {
        const q = p as { value: [number, number] };
        return `θ = ${q.value[1].toFixed(1)}°<br/>${q.value[0].toFixed(2)} dB re peak`;
      },
    },
    series: [
      line('half-power', '−3 dB', halfPower, ACCENT.amber, 'dashed', 1.2),
      line('steer', 'steering direction', ray(input.steerDeg), ACCENT.steer, 'dashed', 1.2),
      ...input.gratingLobesDeg.map((g, i) =>
        line(`grating-${i}`, `grating lobe ${g.toFixed(1)}°`, ray(g), ACCENT.coral, 'dotted', 1.5),
      ),
      {
        ...line(
          'pattern',
          'Beam pattern',
          points(input).map(([t, db]) => [db, t]),
          ACCENT.teal,
          'solid',
          1.6,
        ),
        silent: false,
        tooltip: { show: true },
        areaStyle: { color: ACCENT.tealFill },
      },
    ],
  };
}
