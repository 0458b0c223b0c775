/**
 * Separation versus aperture: the Rayleigh gap 1/(M·d) and Smith's
 * statistical resolution limit against aperture (elements M or length in λ),
 * on a log separation axis (degrees centred on the look direction, or Δu),
 * with the current array as a vertical marker and the planned source pairs as
 * points on it. A pair below the gap is drawn hollow in coral.
 */
import type { LineSeriesOption, ScatterSeriesOption } from 'echarts';
import {
  baseOption,
  fmt,
  gridTop,
  legend,
  orGap,
  valueAxisX,
  valueAxisY,
  type ChartHeading,
  type ChartOption,
} from './common';
import { ACCENT, INK } from './palette';

export interface SeparationInput {
  /** Abscissae: element counts or apertures in λ. */
  x: ArrayLike<number>;
  rayleighGap: ArrayLike<number>;
  statisticalLimit: ArrayLike<number>;
  /** The current array on the same abscissa. */
  currentX: number;
  pairs: { i: number; j: number; separation: number; belowResolvableGap: boolean }[];
  xLabel: string;
  yLabel: string;
  statisticalLabel: string;
}

/** The designer's curves and pairs (lib/designer/analysis.ts), structurally. */
export interface DesignSeparationData {
  curves: {
    elements: ArrayLike<number>;
    apertureWavelengths: ArrayLike<number>;
    rayleighGapU: ArrayLike<number>;
    rayleighGapDeg: ArrayLike<number>;
    statisticalLimitU: ArrayLike<number>;
    statisticalLimitDeg: ArrayLike<number>;
  };
  pairs: { i: number; j: number; chartSeparationDeg: number; separationU: number; belowResolvableGap: boolean }[];
  elements: number;
  spacingWavelengths: number;
  lookDeg: number;
  snrDb: number;
  snapshots: number;
  xKind: 'elements' | 'length';
  yKind: 'deg' | 'u';
}

/** The chart input for a design, as the designer page and the hand-off bundle both draw it. */
export function designSeparationInput(data: DesignSeparationData): SeparationInput {
  const { curves, pairs, elements, spacingWavelengths: d, lookDeg, xKind, yKind } = data;
  const deg = yKind === 'deg';
  return {
    x: xKind === 'elements' ? curves.elements : curves.apertureWavelengths,
    rayleighGap: deg ? curves.rayleighGapDeg : curves.rayleighGapU,
    statisticalLimit: deg ? curves.statisticalLimitDeg : curves.statisticalLimitU,
    currentX: xKind === 'elements' ? elements : (elements - 1) * d,
    pairs: pairs.map((p) => ({
      i: p.i,
      j: p.j,
      separation: deg ? p.chartSeparationDeg : p.separationU,
      belowResolvableGap: p.belowResolvableGap,
    })),
    xLabel: xKind === 'elements' ? 'aperture, elements M' : 'aperture, (M − 1)·d in λ',
    yLabel: deg ? `separation, degrees (pair centred on ${lookDeg.toFixed(1)}°)` : 'separation Δu = |sin θ₁ − sin θ₂|',
    statisticalLabel: `statistical limit (${data.snrDb} dB, N = ${data.snapshots})`,
  };
}

export const RAYLEIGH_LABEL = 'Rayleigh gap 1/(M·d)';

/** The pair points the chart draws (positive, finite separations), in the order given. */
export function separationPairPoints(input: SeparationInput) {
  return input.pairs.filter((p) => Number.isFinite(p.separation) && p.separation > 0);
}

export function separationOption(input: SeparationInput, heading: ChartHeading = {}): ChartOption {
  const positive = (v: number) => (v > 0 ? v : NaN);
  const curve = (ys: ArrayLike<number>) => Array.from(input.x, (x, i) => [x, orGap(positive(ys[i]))]);
  const pts = separationPairPoints(input);
  const values = [
    ...Array.from(input.rayleighGap),
    ...Array.from(input.statisticalLimit),
    ...pts.map((p) => p.separation),
  ].filter((v) => Number.isFinite(v) && v > 0);
  const lo = values.length ? 10 ** Math.floor(Math.log10(Math.min(...values))) : 1e-3;
  const hi = values.length ? 10 ** Math.ceil(Math.log10(Math.max(...values))) : 10;
  const xs = Array.from(input.x);
  const gap: LineSeriesOption = {
    type: 'line',
    id: 'rayleigh',
    name: RAYLEIGH_LABEL,
    data: curve(input.rayleighGap),
    showSymbol: false,
    symbol: 'none',
    lineStyle: { color: ACCENT.steer, width: 1.8 },
    itemStyle: { color: ACCENT.steer },
    emphasis: { disabled: true },
    markLine: {
      symbol: 'none',
      silent: true,
      data: [
        {
          xAxis: input.currentX,
          lineStyle: { color: ACCENT.amber, width: 1.5, type: 'solid' },
          label: { formatter: 'this array', color: ACCENT.amber, fontSize: 10, position: 'insideEndTop' },
        },
      ],
    },
  };
  const stat: LineSeriesOption = {
    type: 'line',
    id: 'statistical',
    name: input.statisticalLabel,
    data: curve(input.statisticalLimit),
    showSymbol: false,
    symbol: 'none',
    lineStyle: { color: ACCENT.tealLight, width: 1.8, type: 'dashed' },
    itemStyle: { color: ACCENT.tealLight },
    emphasis: { disabled: true },
  };
  const pairs: ScatterSeriesOption = {
    type: 'scatter',
    id: 'pairs',
    name: 'planned pairs',
    data: pts.map((p) => ({
      value: [input.currentX, p.separation],
      name: `S${p.i + 1}–S${p.j + 1}`,
      symbolSize: p.belowResolvableGap ? 12 : 9,
      itemStyle: {
        color: p.belowResolvableGap ? '#ffffff' : ACCENT.teal,
        borderColor: p.belowResolvableGap ? ACCENT.coral : ACCENT.teal,
        borderWidth: 2,
      },
      label: {
        show: true,
        position: 'right',
        formatter: `S${p.i + 1}–S${p.j + 1}${p.belowResolvableGap ? ' below gap' : ''}`,
        color: p.belowResolvableGap ? ACCENT.coral : ACCENT.teal,
        fontSize: 10,
      },
    })),
    labelLayout: { moveOverlap: 'shiftY' },
    z: 5,
  };
  return {
    ...baseOption(heading),
    legend: legend([RAYLEIGH_LABEL, input.statisticalLabel, 'planned pairs']),
    grid: { outerBoundsMode: 'none', left: 64, right: 24, top: gridTop(heading, true), bottom: 42 },
    xAxis: valueAxisX(input.xLabel, { min: Math.min(...xs), max: Math.max(...xs) }),
    yAxis: valueAxisY(input.yLabel, {
      type: 'log',
      min: lo,
      max: hi,
      logBase: 10,
      nameGap: 46,
      axisLabel: { color: INK.text, fontSize: 10, formatter: (v: number) => (v >= 1 ? v.toFixed(0) : fmt(v, 1)) },
    }),
    tooltip: {
      trigger: 'axis',
      confine: true,
      className: 'chart-tooltip',
      valueFormatter: (v: unknown) => (typeof v === 'number' ? fmt(v, 4) : '—'),
    },
    series: [gap, stat, pairs],
  };
}
