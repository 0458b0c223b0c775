/**
 * Pseudo-spectra of a run, overlaid: each normalised to its own peak (0 dB),
 * on the grid the run computed (the API default is 0.01°, docs/conventions.md §4),
 * every point kept. Each method's bearings are ticked at the top in its colour,
 * with a ±1σ bar (stochastic CRB) where the run has one. Spectral methods draw
 * solid lines; ESPRIT and root-MUSIC draw the MUSIC spectrum of their signal
 * subspace dashed.
 *
 * Angles are degrees from broadside (docs/conventions.md §1).
 */
import type { CustomSeriesOption, CustomSeriesRenderItem, LineSeriesOption } from 'echarts';
import {
  degreeLabel,
  baseOption,
  escapeHtml,
  gridTop,
  legend,
  valueAxisX,
  valueAxisY,
  type ChartHeading,
  type ChartOption,
} from './common';
import { INK, methodColour } from './palette';

export interface SpectrumInput {
  startDeg: number;
  stepDeg: number;
  /** dB as the API reports it; null where the spectrum is zero or not finite. */
  valuesDb: (number | null)[];
}

export interface SpectrumSeriesInput {
  method: string;
  label: string;
  spectrum?: SpectrumInput;
  bearingsDeg: number[];
  /** ±1σ per bearing in degrees (stochastic CRB), when the run has it. */
  crbStdDeg?: number[] | null;
}

export const SPECTRUM_FLOOR_DB = -50;

/** Methods whose spectrum is their own (the others show the MUSIC spectrum of their signal subspace). */
export const OWN_SPECTRUM = new Set(['music', 'bartlett', 'mvdr']);

/** Series ids: the readout and the tests find a method's spectrum by `spectrum:<method>`. */
export const spectrumSeriesId = (method: string) => `spectrum:${method}`;

/** Bearing of grid point i, rounded to 1e−9° so 0.01° steps print as such. */
export const gridBearing = (s: SpectrumInput, i: number) => Math.round((s.startDeg + i * s.stepDeg) * 1e9) / 1e9;

/**
 * The window the run page opens on: every estimated bearing with a margin of
 * 60 % of their spread (at least 1.5°) each side; null when there is no bearing.
 */
export function spectrumFocus(series: SpectrumSeriesInput[]): { fromDeg: number; toDeg: number } | null {
  const all = series.flatMap((s) => s.bearingsDeg).filter(Number.isFinite);
  if (!all.length) return null;
  const lo = Math.min(...all);
  const hi = Math.max(...all);
  const pad = Math.max(1.5, 0.6 * (hi - lo));
  return { fromDeg: Math.max(-90, lo - pad), toDeg: Math.min(90, hi + pad) };
}

type Readout = { seriesId?: string; seriesName?: string; color?: unknown; value?: unknown };

/** The cursor readout: bearing under the pointer and each visible spectrum's value there. */
export function spectrumReadout(params: Readout | Readout[]): string {
  const list = (Array.isArray(params) ? params : [params]).filter((p) => p.seriesId?.startsWith('spectrum:'));
  if (!list.length) return '';
  const rows = list.map((p) => {
    const [theta, , raw, rel] = p.value as [number, number, number | null, number | null];
    const method = p.seriesId!.slice('spectrum:'.length);
    const relText = rel === null ? 'no value' : `${rel.toFixed(2)} dB re peak`;
    const rawText = raw === null ? '' : ` (${raw.toFixed(3)} dB)`;
    return (
      `<div class="chart-readout-row" data-method="${escapeHtml(method)}" data-bearing="${theta}" data-db="${raw ?? ''}" data-db-re-peak="${rel ?? ''}">` +
      `<span style="display:inline-block;width:8px;height:8px;border-radius:4px;margin-right:6px;background:${String(p.color)}"></span>` +
      `${escapeHtml(p.seriesName ?? method)}: ${relText}${rawText} at ${theta.toFixed(2)}°</div>`
    );
  });
  const theta = (list[0].value as number[])[0];
  return `<div class="chart-readout" data-bearing="${theta}"><div style="font-weight:600">θ = ${theta.toFixed(2)}°</div>${rows.join('')}</div>`;
}

export function spectrumOption(
  input: { series: SpectrumSeriesInput[]; floorDb?: number },
  heading: ChartHeading = {},
): ChartOption {
  const floorDb = input.floorDb ?? SPECTRUM_FLOOR_DB;
  const lines: LineSeriesOption[] = [];
  const marks: CustomSeriesOption[] = [];
  input.series.forEach((s, k) => {
    const colour = methodColour(s.method);
    if (s.spectrum) {
      const v = s.spectrum.valuesDb;
      let max = -Infinity;
      for (const d of v) if (d !== null && d > max) max = d;
      const data: [number, number | '-', number | null, number | null][] = new Array(v.length);
      for (let i = 0; i < v.length; i++) {
        const raw = v[i];
        const rel = raw === null ? null : raw - max;
        data[i] = [gridBearing(s.spectrum, i), rel === null ? '-' : Math.max(floorDb, rel), raw, rel];
      }
      lines.push({
        type: 'line',
        id: spectrumSeriesId(s.method),
        name: s.label,
        data: data as LineSeriesOption['data'],
        showSymbol: false,
        symbol: 'none',
        lineStyle: { color: colour, width: 1.4, type: OWN_SPECTRUM.has(s.method) ? 'solid' : 'dashed' },
        itemStyle: { color: colour },
        emphasis: { disabled: true },
        clip: true,
      });
    }
    const renderTick: CustomSeriesRenderItem = (params, api) => {
      const b = Number(api.value(0));
      const sd = Number(api.value(1));
      const [x, top] = api.coord([b, 0]);
      const length = 10 + 4 * k;
      const children: NonNullable<ReturnType<CustomSeriesRenderItem>>[] = [
        { type: 'line', shape: { x1: x, y1: top, x2: x, y2: top + length }, style: { stroke: colour, lineWidth: 2 } },
      ];
      if (sd > 0) {
        const [xl] = api.coord([b - sd, 0]);
        const [xr] = api.coord([b + sd, 0]);
        const y = top + length - 2;
        children.push(
          { type: 'line', shape: { x1: xl, y1: y, x2: xr, y2: y }, style: { stroke: colour, lineWidth: 1.2 } },
          { type: 'line', shape: { x1: xl, y1: y - 3, x2: xl, y2: y + 3 }, style: { stroke: colour, lineWidth: 1.2 } },
          { type: 'line', shape: { x1: xr, y1: y - 3, x2: xr, y2: y + 3 }, style: { stroke: colour, lineWidth: 1.2 } },
        );
      }
      return { type: 'group', children } as ReturnType<CustomSeriesRenderItem>;
    };
    marks.push({
      type: 'custom',
      id: `bearings:${s.method}`,
      name: s.label,
      renderItem: renderTick,
      data: s.bearingsDeg.map((b, i) => [b, s.crbStdDeg?.[i] ?? 0]),
      encode: { x: 0 },
      itemStyle: { color: colour },
      clip: true,
      silent: true,
      tooltip: { show: false },
    });
  });
  const withLegend = input.series.length > 1;
  return {
    ...baseOption(heading),
    legend: legend(input.series.map((s) => s.label)),
    grid: { outerBoundsMode: 'none', left: 52, right: 16, top: gridTop(heading, withLegend), bottom: 40 },
    xAxis: valueAxisX('bearing from broadside (degrees)', {
      min: -90,
      max: 90,
      axisLabel: { color: INK.text, fontSize: 10, formatter: degreeLabel },
    }),
    yAxis: valueAxisY('dB re peak', { min: floorDb, max: 0 }),
    tooltip: {
      trigger: 'axis',
      axisPointer: { type: 'line', lineStyle: { color: INK.muted, type: 'dashed' } },
      formatter: spectrumReadout as never,
      className: 'chart-tooltip',
      confine: true,
    },
    series: [...lines, ...marks],
  };
}
