/**
 * The bearing–time record as a chart: bearing across (degrees from broadside,
 * docs/conventions.md §1), time down (seconds from the first sample of the
 * recording, docs/conventions.md §9), level as colour, tracks drawn over it.
 *
 * Speed: the level grid is turned into RGBA pixels once (`imageToRgba`, one
 * pixel per grid cell) and drawn as a single image element, stretched over the
 * grid's extent by a custom series; zoom and pan only move that element, so a
 * record of thousands of blocks draws as fast as one of ten. Grids larger than
 * the screen can show are first max-pooled (`decimateLevels`), which keeps narrow
 * tracks visible.
 *
 * Colour map: our own (`BTR_COLOURS`), built in CIELAB with lightness L* rising
 * linearly from 8 to 96 while the hue turns from violet through teal and green
 * to pale yellow; chroma is reduced where a colour would leave sRGB. Equal steps in
 * dB are then equal steps in perceived lightness, and the map reads in grey scale.
 *
 * The cursor readout (`levelAt`) is the value of the grid cell under the
 * pointer, never an interpolation. No React and no DOM here: the page paints the
 * RGBA buffer to a canvas and hands its data URL to `bearingTimeOption`.
 */
import type { CustomSeriesOption, CustomSeriesRenderItem, LineSeriesOption, ScatterSeriesOption } from 'echarts';
import { baseOption, degreeLabel, type ChartHeading, type ChartOption, valueAxisX, valueAxisY } from './common';
import { INK } from './palette';
import type { SpectrumSeriesInput } from './spectrum';

/** The display grid of a record: levelsDb[r][c] at bearing bearingsDeg[c] and time timesS[r]. */
export interface BearingTimeImage {
  bearingsDeg: number[];
  timesS: number[];
  levelsDb: number[][];
}

export interface BearingTimeBlockInput {
  startS: number;
  endS: number;
  bearingsDeg: number[];
  stdDeg?: number[];
}

export interface BearingTimeTrackInput {
  id: number | string;
  points: { tS: number; bearingDeg: number }[];
}

export interface LevelRange {
  minDb: number;
  maxDb: number;
}

/* ------------------------------------------------------------------ colours */

const LUT_SIZE = 256;

function labToSrgb(l: number, a: number, b: number): [number, number, number] | null {
  // CIELAB (D65 white) → linear sRGB → gamma-encoded sRGB in [0, 1]; null outside the gamut.
  const fy = (l + 16) / 116;
  const fx = fy + a / 500;
  const fz = fy - b / 200;
  const inv = (f: number) => (f ** 3 > 0.008856 ? f ** 3 : (f - 16 / 116) / 7.787);
  const x = 0.95047 * inv(fx);
  const y = 1.0 * inv(fy);
  const z = 1.08883 * inv(fz);
  const lin = [
    3.2404542 * x - 1.5371385 * y - 0.4985314 * z,
    -0.969266 * x + 1.8760108 * y + 0.041556 * z,
    0.0556434 * x - 0.2040259 * y + 1.0572252 * z,
  ];
  const out: number[] = [];
  for (const v of lin) {
    if (v < -1e-9 || v > 1 + 1e-9) return null;
    const c = Math.min(1, Math.max(0, v));
    out.push(c <= 0.0031308 ? 12.92 * c : 1.055 * c ** (1 / 2.4) - 0.055);
  }
  return out as [number, number, number];
}

/** CIE L* of an 8-bit sRGB colour (D65), for the map's own check. */
export function lightnessOf(rgb: readonly [number, number, number]): number {
  const lin = rgb.map((v) => {
    const c = v / 255;
    return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
  });
  const y = 0.2126729 * lin[0] + 0.7151522 * lin[1] + 0.072175 * lin[2];
  return y > 0.008856 ? 116 * Math.cbrt(y) - 16 : 903.3 * y;
}

function buildColours(): Uint8Array {
  const lut = new Uint8Array(LUT_SIZE * 3);
  for (let i = 0; i < LUT_SIZE; i++) {
    const t = i / (LUT_SIZE - 1);
    const l = 8 + 88 * t;
    const hue = ((285 - 190 * t) * Math.PI) / 180;
    let chroma = 18 + 42 * Math.sin(Math.PI * Math.min(1, t * 1.1)) ** 0.7 + 10 * t;
    let rgb = labToSrgb(l, chroma * Math.cos(hue), chroma * Math.sin(hue));
    while (!rgb && chroma > 0) {
      chroma -= 0.5;
      rgb = labToSrgb(l, chroma * Math.cos(hue), chroma * Math.sin(hue));
    }
    const c = rgb ?? [l / 100, l / 100, l / 100];
    for (let k = 0; k < 3; k++) lut[3 * i + k] = Math.round(255 * c[k]);
  }
  return lut;
}

/** The colour map: LUT_SIZE entries of 8-bit RGB, dark (low level) to light (high level). */
export const BTR_COLOURS: Uint8Array = buildColours();

/** Colour of a position t in [0, 1] of the map (clamped), as 8-bit RGB. */
export function colourAt(t: number): [number, number, number] {
  const i = Math.round(Math.min(1, Math.max(0, Number.isFinite(t) ? t : 0)) * (LUT_SIZE - 1));
  return [BTR_COLOURS[3 * i], BTR_COLOURS[3 * i + 1], BTR_COLOURS[3 * i + 2]];
}

const hex = (rgb: [number, number, number]) => `#${rgb.map((v) => v.toString(16).padStart(2, '0')).join('')}`;

/** `count` evenly spaced colours of the map as #rrggbb, for the colour bar. */
export function colourStops(count = 16): string[] {
  return Array.from({ length: count }, (_, i) => hex(colourAt(i / (count - 1))));
}

/**
 * The dB window the colours span: the largest finite level at the top and
 * `dynamicRangeDb` below it at the bottom (default 30 dB). Levels below the
 * window take the darkest colour, above it the lightest.
 */
export function levelRange(image: Pick<BearingTimeImage, 'levelsDb'>, dynamicRangeDb = 30): LevelRange {
  let max = -Infinity;
  for (const row of image.levelsDb) for (const v of row) if (Number.isFinite(v) && v > max) max = v;
  if (!Number.isFinite(max)) max = 0;
  max += 0; // no −0
  return { minDb: max - dynamicRangeDb, maxDb: max };
}

/**
 * RGBA pixels of the grid, one per cell: row r (time) is pixel row r, so the
 * earliest time is at the top. A level that is NaN (no value) is transparent;
 * −∞ (zero power) takes the darkest colour.
 */
export function imageToRgba(
  image: Pick<BearingTimeImage, 'levelsDb'>,
  range: LevelRange,
): { width: number; height: number; data: Uint8ClampedArray<ArrayBuffer> } {
  const height = image.levelsDb.length;
  const width = height ? image.levelsDb[0].length : 0;
  const data = new Uint8ClampedArray(width * height * 4);
  const span = range.maxDb - range.minDb || 1;
  for (let r = 0; r < height; r++) {
    const row = image.levelsDb[r];
    if (row.length !== width) throw new RangeError(`levelsDb row ${r} has ${row.length} values, expected ${width}`);
    for (let c = 0; c < width; c++) {
      const v = row[c];
      const p = 4 * (r * width + c);
      if (Number.isNaN(v)) continue; // transparent
      const t = v === -Infinity ? 0 : Math.min(1, Math.max(0, (v - range.minDb) / span));
      const i = 3 * Math.round(t * (LUT_SIZE - 1));
      data[p] = BTR_COLOURS[i];
      data[p + 1] = BTR_COLOURS[i + 1];
      data[p + 2] = BTR_COLOURS[i + 2];
      data[p + 3] = 255;
    }
  }
  return { width, height, data };
}

/* --------------------------------------------------------------- the grid */

/**
 * A grid of at most maxRows × maxCols: consecutive rows and columns are grouped
 * evenly, each cell keeps its group's maximum level (so a one-cell-wide track
 * survives) and each axis value is its group's mean. The input is not changed;
 * a grid already small enough is returned as is.
 */
export function decimateLevels(image: BearingTimeImage, maxRows: number, maxCols: number): BearingTimeImage {
  if (!(Number.isInteger(maxRows) && maxRows >= 1 && Number.isInteger(maxCols) && maxCols >= 1)) {
    throw new RangeError(`maxRows ${maxRows} and maxCols ${maxCols} must be positive integers`);
  }
  const nRows = image.timesS.length;
  const nCols = image.bearingsDeg.length;
  if (nRows <= maxRows && nCols <= maxCols) return image;
  const rows = Math.min(maxRows, nRows);
  const cols = Math.min(maxCols, nCols);
  const rowEdge = (r: number) => Math.round((r * nRows) / rows);
  const colEdge = (c: number) => Math.round((c * nCols) / cols);
  const mean = (values: number[], a: number, b: number) => {
    let s = 0;
    for (let i = a; i < b; i++) s += values[i];
    return s / (b - a);
  };
  const bearingsDeg = Array.from({ length: cols }, (_, c) => mean(image.bearingsDeg, colEdge(c), colEdge(c + 1)));
  const timesS = Array.from({ length: rows }, (_, r) => mean(image.timesS, rowEdge(r), rowEdge(r + 1)));
  const levelsDb: number[][] = [];
  for (let r = 0; r < rows; r++) {
    const line = new Array<number>(cols);
    for (let c = 0; c < cols; c++) {
      let best = NaN;
      for (let i = rowEdge(r); i < rowEdge(r + 1); i++) {
        const src = image.levelsDb[i];
        for (let k = colEdge(c); k < colEdge(c + 1); k++) {
          const v = src[k];
          if (!Number.isNaN(v) && !(v <= best)) best = v;
        }
      }
      line[c] = best;
    }
    levelsDb.push(line);
  }
  return { bearingsDeg, timesS, levelsDb };
}

/** Spacing of axis centres (uniform grid assumed: (last − first)/(n − 1)), or `fallback` for one value. */
function step(values: number[], fallback: number): number {
  return values.length > 1 ? (values[values.length - 1] - values[0]) / (values.length - 1) : fallback;
}

/**
 * Edges of the drawn image: each cell spans half a step either side of its
 * centre. With one row, its height is `rowSeconds` (the block length; default 1 s).
 */
export function imageExtent(
  image: Pick<BearingTimeImage, 'bearingsDeg' | 'timesS'>,
  rowSeconds = 1,
): { bearing: [number, number]; time: [number, number] } {
  const db = step(image.bearingsDeg, 1);
  const dt = step(image.timesS, rowSeconds);
  const b = image.bearingsDeg;
  const t = image.timesS;
  return {
    bearing: [b[0] - db / 2, b[b.length - 1] + db / 2],
    time: [t[0] - dt / 2, t[t.length - 1] + dt / 2],
  };
}

export interface LevelReadout {
  row: number;
  col: number;
  /** Centre of the cell, degrees. */
  bearingDeg: number;
  /** Centre of the cell, seconds. */
  tS: number;
  /** The grid value itself (no interpolation). */
  levelDb: number;
}

/** The cell under a point (nearest centre on each axis), or null outside the image. */
export function levelAt(image: BearingTimeImage, bearingDeg: number, tS: number, rowSeconds = 1): LevelReadout | null {
  const nRows = image.timesS.length;
  const nCols = image.bearingsDeg.length;
  if (!nRows || !nCols || !Number.isFinite(bearingDeg) || !Number.isFinite(tS)) return null;
  const ext = imageExtent(image, rowSeconds);
  if (bearingDeg < ext.bearing[0] || bearingDeg > ext.bearing[1] || tS < ext.time[0] || tS > ext.time[1]) return null;
  const col = nearest(image.bearingsDeg, bearingDeg);
  const row = nearest(image.timesS, tS);
  return { row, col, bearingDeg: image.bearingsDeg[col], tS: image.timesS[row], levelDb: image.levelsDb[row][col] };
}

/** Index of the ascending value nearest x (binary search; ties go to the lower index). */
function nearest(values: number[], x: number): number {
  let lo = 0;
  let hi = values.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (values[mid] <= x) lo = mid;
    else hi = mid;
  }
  return Math.abs(values[hi] - x) < Math.abs(values[lo] - x) ? hi : lo;
}

/**
 * The block a time belongs to: of the blocks whose [startS, endS] holds it, the
 * one whose centre is nearest (overlapping blocks share time); -1 if none does.
 * Blocks are in time order.
 */
export function blockAt(blocks: Pick<BearingTimeBlockInput, 'startS' | 'endS'>[], tS: number): number {
  if (!blocks.length || !Number.isFinite(tS)) return -1;
  const centres = blocks.map((b) => (b.startS + b.endS) / 2);
  const i = nearest(centres, tS);
  return tS >= blocks[i].startS && tS <= blocks[i].endS ? i : -1;
}

/** Seconds as m:ss.s (or h:mm:ss for an hour or more). */
export function clockLabel(seconds: number, decimals = 1): string {
  if (!Number.isFinite(seconds)) return '—';
  const sign = seconds < 0 ? '−' : '';
  // Round first, so 119.6 s at whole seconds is 2:00, not 1:60.
  const s = Number(Math.abs(seconds).toFixed(decimals));
  const h = Math.floor(s / 3600);
  const m = Math.floor((s - 3600 * h) / 60);
  const sec = (s - 3600 * h - 60 * m).toFixed(decimals).padStart(decimals ? 3 + decimals : 2, '0');
  return h ? `${sign}${h}:${String(m).padStart(2, '0')}:${sec}` : `${sign}${m}:${sec}`;
}

/* -------------------------------------------------------------- the option */

/** Series and component ids: the page and the tests find parts of the chart by these. */
export const BTR_IDS = {
  image: 'btr-image',
  blockBearings: 'btr-block-bearings',
  selected: 'btr-selected-block',
  track: (id: number | string) => `track:${id}`,
  zoomBearing: 'btr-zoom-bearing',
  zoomTime: 'btr-zoom-time',
  zoomBearingSlider: 'btr-zoom-bearing-slider',
  zoomTimeSlider: 'btr-zoom-time-slider',
} as const;

/** Track colours: light and saturated enough to read over every part of the map. */
export const TRACK_COLOURS = ['#ff5a36', '#ffffff', '#ff3d9a', '#37d6ff', '#ffb000', '#b6ff3b'];

export const trackColour = (index: number) => TRACK_COLOURS[index % TRACK_COLOURS.length];

export interface BearingTimeOptionInput {
  image: BearingTimeImage;
  /** The image's pixels as a URL (a canvas data URL on the page); null draws no image. */
  imageHref: string | null;
  range: LevelRange;
  tracks?: BearingTimeTrackInput[];
  blocks?: BearingTimeBlockInput[];
  /** Draw each block's bearings as dots (default true). */
  showBlockBearings?: boolean;
  /** Index into blocks of the highlighted block. */
  selectedBlock?: number | null;
  /** Height of the whole chart in pixels (the colour bar spans the plot). */
  height: number;
  /** Block length in seconds, for the height of a one-row image (default 1). */
  rowSeconds?: number;
}

/** The highlight of one block (a dashed band across the plot over its time span); none for null or an unknown index. */
export function selectedBlockSeries(
  blocks: Pick<BearingTimeBlockInput, 'startS' | 'endS'>[],
  index: number | null,
): CustomSeriesOption {
  const sel = index !== null && blocks[index] ? blocks[index] : null;
  const renderBand: CustomSeriesRenderItem = (params, api) => {
    const grid = params.coordSys as unknown as { x: number; width: number };
    const y0 = api.coord([0, Number(api.value(1))])[1];
    const y1 = api.coord([0, Number(api.value(2))])[1];
    return {
      type: 'rect',
      shape: { x: grid.x, y: Math.min(y0, y1), width: grid.width, height: Math.max(1, Math.abs(y1 - y0)) },
      style: { fill: 'rgba(255,255,255,0.18)', stroke: '#ffffff', lineWidth: 1.2, lineDash: [5, 3] },
      silent: true,
    } as ReturnType<CustomSeriesRenderItem>;
  };
  return {
    type: 'custom',
    id: BTR_IDS.selected,
    name: 'selected block',
    renderItem: renderBand,
    data: sel ? [[0, sel.startS, sel.endS]] : [],
    encode: { x: 0, y: [1, 2] },
    clip: true,
    silent: true,
    z: 5,
    tooltip: { show: false },
  };
}

/**
 * A block's wideband spectrum as the run page's spectrum chart takes it
 * (lib/charts/spectrum.ts): the record's grid is uniform, so it becomes start and step.
 */
export function blockSpectrumSeries(
  detail: { spectrum: { bearingsDeg: number[]; levelsDb: number[] }; bearingsDeg: number[]; stdDeg: number[] },
  method: string,
  label: string,
): SpectrumSeriesInput {
  const b = detail.spectrum.bearingsDeg;
  return {
    method,
    label,
    spectrum: {
      startDeg: b[0] ?? -90,
      stepDeg: b.length > 1 ? (b[b.length - 1] - b[0]) / (b.length - 1) : 1,
      valuesDb: detail.spectrum.levelsDb.map((v) => (Number.isFinite(v) ? v : null)),
    },
    bearingsDeg: detail.bearingsDeg,
    crbStdDeg: detail.stdDeg,
  };
}

export const BTR_GRID = { left: 64, right: 118, top: 34, bottom: 70 } as const;

export function bearingTimeOption(input: BearingTimeOptionInput, heading: ChartHeading = {}): ChartOption {
  const { image, range } = input;
  const ext = imageExtent(image, input.rowSeconds ?? 1);
  const top = BTR_GRID.top + (heading.title ? 40 : 0);
  const plotHeight = Math.max(40, input.height - top - BTR_GRID.bottom);
  const pixels = { width: image.bearingsDeg.length, height: image.timesS.length };

  const renderImage: CustomSeriesRenderItem = (_params, api) => {
    if (!input.imageHref || !pixels.width || !pixels.height) return null;
    const [x0, y0] = api.coord([ext.bearing[0], ext.time[0]]);
    const [x1, y1] = api.coord([ext.bearing[1], ext.time[1]]);
    // zrender's SVG image keeps its aspect ratio, so draw it at its own size and stretch it by a transform.
    return {
      type: 'image',
      x: Math.min(x0, x1),
      y: Math.min(y0, y1),
      scaleX: Math.abs(x1 - x0) / pixels.width,
      scaleY: Math.abs(y1 - y0) / pixels.height,
      style: { image: input.imageHref, x: 0, y: 0, width: pixels.width, height: pixels.height },
      silent: true,
    } as ReturnType<CustomSeriesRenderItem>;
  };

  const series: (CustomSeriesOption | LineSeriesOption | ScatterSeriesOption)[] = [
    {
      type: 'custom',
      id: BTR_IDS.image,
      name: 'level',
      renderItem: renderImage,
      data: [[ext.bearing[0], ext.time[0], ext.bearing[1], ext.time[1]]],
      encode: { x: [0, 2], y: [1, 3] },
      clip: true,
      silent: true,
      z: 1,
      tooltip: { show: false },
    },
  ];

  const blocks = input.blocks ?? [];
  if (blocks.length && input.showBlockBearings !== false) {
    const dots: [number, number][] = [];
    for (const b of blocks) for (const bearing of b.bearingsDeg) dots.push([bearing, (b.startS + b.endS) / 2]);
    series.push({
      type: 'scatter',
      id: BTR_IDS.blockBearings,
      name: 'block bearings',
      data: dots,
      symbol: 'circle',
      symbolSize: 3,
      itemStyle: { color: 'rgba(255,255,255,0.85)', borderColor: 'rgba(17,28,40,0.6)', borderWidth: 0.5 },
      large: dots.length > 2000,
      silent: true,
      clip: true,
      z: 3,
    });
  }

  (input.tracks ?? []).forEach((track, i) => {
    const colour = trackColour(i);
    series.push({
      type: 'line',
      id: BTR_IDS.track(track.id),
      name: `track ${track.id}`,
      data: track.points.map((p) => [p.bearingDeg, p.tS]),
      showSymbol: false,
      symbol: 'none',
      lineStyle: { color: colour, width: 2, shadowColor: 'rgba(0,0,0,0.55)', shadowBlur: 2 },
      itemStyle: { color: colour },
      emphasis: { disabled: true },
      silent: true,
      clip: true,
      z: 4,
      endLabel: { show: true, formatter: String(track.id), color: colour, fontSize: 11, fontWeight: 600 },
    } as LineSeriesOption);
  });

  series.push(selectedBlockSeries(blocks, input.selectedBlock ?? null));

  const inside = {
    type: 'inside' as const,
    filterMode: 'none' as const,
    zoomOnMouseWheel: true,
    moveOnMouseMove: false,
  };
  const slider = {
    type: 'slider' as const,
    filterMode: 'none' as const,
    showDetail: false,
    brushSelect: false,
    borderColor: INK.faint,
    fillerColor: 'rgba(43,153,134,0.15)',
    handleStyle: { color: '#ffffff', borderColor: INK.axis },
    moveHandleSize: 0,
    textStyle: { color: INK.text, fontSize: 10 },
  };

  return {
    ...baseOption(heading),
    grid: { outerBoundsMode: 'none', left: BTR_GRID.left, right: BTR_GRID.right, top, bottom: BTR_GRID.bottom },
    xAxis: valueAxisX('bearing from broadside (degrees)', {
      min: ext.bearing[0],
      max: ext.bearing[1],
      splitLine: { show: false },
      axisLabel: { color: INK.text, fontSize: 10, formatter: degreeLabel, hideOverlap: true },
    }),
    yAxis: valueAxisY('time (m:ss)', {
      min: ext.time[0],
      max: ext.time[1],
      inverse: true,
      nameGap: 48,
      splitLine: { show: false },
      axisLabel: { color: INK.text, fontSize: 10, formatter: (v: number) => clockLabel(v, 0), hideOverlap: true },
    }),
    dataZoom: [
      { ...inside, id: BTR_IDS.zoomBearing, xAxisIndex: 0 },
      { ...inside, id: BTR_IDS.zoomTime, yAxisIndex: 0 },
      { ...slider, id: BTR_IDS.zoomBearingSlider, xAxisIndex: 0, bottom: 8, height: 16 },
      { ...slider, id: BTR_IDS.zoomTimeSlider, yAxisIndex: 0, right: 84, width: 14, top, bottom: BTR_GRID.bottom },
    ],
    toolbox: {
      left: 4,
      top: 0,
      itemSize: 13,
      feature: {
        dataZoom: { xAxisIndex: 0, yAxisIndex: 0, title: { zoom: 'Drag a box to zoom', back: 'Undo zoom' } },
        restore: { title: 'Reset' },
      },
    },
    visualMap: {
      type: 'continuous' as const,
      seriesIndex: [],
      min: range.minDb,
      max: range.maxDb,
      calculable: false,
      hoverLink: false,
      orient: 'vertical',
      right: 14,
      top: top + 14,
      itemWidth: 14,
      itemHeight: Math.max(20, plotHeight - 28),
      text: [`${fmtDb(range.maxDb)} dB`, `${fmtDb(range.minDb)} dB`],
      textGap: 4,
      textStyle: { color: INK.text, fontSize: 10 },
      inRange: { color: colourStops(24) },
      formatter: (v: unknown) => fmtDb(Number(v)),
    },
    tooltip: {
      trigger: 'none',
      axisPointer: {
        type: 'cross',
        label: { show: false },
        crossStyle: { color: 'rgba(255,255,255,0.75)', type: 'dashed' },
      },
    },
    series,
  };
}

const fmtDb = (v: number) => (Number.isFinite(v) ? String(Number(v.toFixed(1))) : '—');
