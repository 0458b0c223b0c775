/**
 * Pieces every chart option shares: no animation (exports and screenshots
 * show the final state), the house font, a white background, thin grid lines
 * and axis names in the ink tones.
 */
import type { EChartsOption, XAXisComponentOption, YAXisComponentOption } from 'echarts';
import { CHART_FONT, INK } from './palette';

export type ChartOption = EChartsOption;

/** Size a chart is drawn at when no container decides (exports, the hand-off bundle). */
export interface ChartSize {
  width: number;
  height: number;
}

/** Optional heading drawn inside the figure (used where the figure stands alone, e.g. in a bundle). */
export interface ChartHeading {
  title?: string;
  subtitle?: string;
}

export function baseOption(heading: ChartHeading = {}): ChartOption {
  return {
    animation: false,
    backgroundColor: '#ffffff',
    textStyle: { fontFamily: CHART_FONT, fontSize: 11, color: INK.text },
    ...(heading.title
      ? {
          title: {
            text: heading.title,
            subtext: heading.subtitle,
            left: 12,
            top: 6,
            textStyle: { fontSize: 14, fontWeight: 600, color: INK.strong, fontFamily: CHART_FONT },
            subtextStyle: { fontSize: 11, color: INK.text, fontFamily: CHART_FONT },
          },
        }
      : {}),
  };
}

/** Top margin of the plot: room for a heading and a legend row. */
export function gridTop(heading: ChartHeading, legend: boolean): number {
  return (heading.title ? (heading.subtitle ? 52 : 34) : 8) + (legend ? 26 : 6);
}

const axisCommon = {
  nameLocation: 'middle' as const,
  nameTextStyle: { color: INK.text, fontSize: 11 },
  axisLine: { lineStyle: { color: INK.axis } },
  axisTick: { lineStyle: { color: INK.axis } },
  axisLabel: { color: INK.text, fontSize: 10 },
  splitLine: { lineStyle: { color: INK.grid } },
};

export function valueAxisX(name: string, extra: Partial<XAXisComponentOption> = {}): XAXisComponentOption {
  return { type: 'value', name, nameGap: 26, ...axisCommon, ...extra } as XAXisComponentOption;
}

export function valueAxisY(name: string, extra: Partial<YAXisComponentOption> = {}): YAXisComponentOption {
  return { type: 'value', name, nameGap: 40, ...axisCommon, ...extra } as YAXisComponentOption;
}

export function legend(data?: string[]): ChartOption['legend'] {
  return {
    top: 0,
    right: 8,
    itemWidth: 22,
    itemHeight: 8,
    textStyle: { color: INK.text, fontSize: 11 },
    ...(data ? { data } : {}),
  };
}

/** A finite number, or ECharts' "no value" marker (a gap in a line). */
export const orGap = (v: number | null | undefined): number | '-' =>
  v === null || v === undefined || !Number.isFinite(v) ? '-' : v;

export const fmt = (v: number, digits = 3) => (Number.isFinite(v) ? Number(v.toPrecision(digits)).toString() : '—');

export const escapeHtml = (s: string) =>
  s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

/** A bearing axis label: at most two decimals (a zoomed axis labels its ends at arbitrary values). */
export const degreeLabel = (v: number) => `${Number(v.toFixed(2))}°`;
