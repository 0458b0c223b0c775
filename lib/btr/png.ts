/**
 * The PNG export of a bearing–time record (server side, pure JS with pngjs): the
 * image (bearing across, time down, level as colour), the tracks drawn over it in red,
 * axis ticks with labels (bearing in degrees along the top, time in seconds down
 * the left) and a colour bar with its dB scale on the right.
 *
 * Colour scale: the top is the largest level in the record (rounded to 1 dB), the bottom 30 dB
 * below it (DISPLAY_RANGE_DB); lower levels take the bottom colour. The colour
 * map is a sequential dark-blue → teal → yellow ramp (linear interpolation
 * between VIRIDIS_STOPS, an approximation of the viridis map).
 * Rows: when the record has more blocks than MAX_PLOT_ROWS, consecutive blocks
 * are grouped and each pixel keeps the group's maximum (as decimateImage does),
 * so narrow tracks survive.
 */
import { PNG } from 'pngjs';

export const DISPLAY_RANGE_DB = 30;
const MAX_PLOT_ROWS = 1200;
const PLOT_WIDTH = 720;
const LEFT = 64;
const TOP = 34;
const RIGHT = 84;
const BOTTOM = 16;
const BAR_WIDTH = 16;
const TRACK: [number, number, number] = [230, 40, 60];

const VIRIDIS_STOPS: [number, number, number][] = [
  [68, 1, 84],
  [59, 82, 139],
  [33, 145, 140],
  [94, 201, 98],
  [253, 231, 37],
];

export function colourOf(t: number): [number, number, number] {
  const x = Math.min(1, Math.max(0, t)) * (VIRIDIS_STOPS.length - 1);
  const i = Math.min(VIRIDIS_STOPS.length - 2, Math.floor(x));
  const f = x - i;
  const a = VIRIDIS_STOPS[i];
  const b = VIRIDIS_STOPS[i + 1];
  return [
    Math.round(a[0] + f * (b[0] - a[0])),
    Math.round(a[1] + f * (b[1] - a[1])),
    Math.round(a[2] + f * (b[2] - a[2])),
  ];
}

/** A 3 × 5 pixel font for the labels (digits and a few signs). */
const GLYPHS: Record<string, string[]> = {
  '0': ['111', '101', '101', '101', '111'],
  '1': ['010', '110', '010', '010', '111'],
  '2': ['111', '001', '111', '100', '111'],
  '3': ['111', '001', '111', '001', '111'],
  '4': ['101', '101', '111', '001', '001'],
  '5': ['111', '100', '111', '001', '111'],
  '6': ['111', '100', '111', '101', '111'],
  '7': ['111', '001', '010', '010', '010'],
  '8': ['111', '101', '111', '101', '111'],
  '9': ['111', '101', '111', '001', '111'],
  '-': ['000', '000', '111', '000', '000'],
  '.': ['000', '000', '000', '000', '010'],
  ' ': ['000', '000', '000', '000', '000'],
  s: ['000', '011', '110', '011', '110'],
  d: ['001', '001', '111', '101', '111'],
  B: ['110', '101', '110', '101', '110'],
  '°': ['111', '101', '111', '000', '000'],
};

export interface BtrPngInput {
  /** rows × count dB values, row per block in time order. */
  levels: Float32Array;
  rows: number;
  grid: { startDeg: number; stepDeg: number; count: number };
  /** Centre time of each block, seconds. */
  timesS: number[];
  tracks: { points: { tS: number; bearingDeg: number }[] }[];
}

class Canvas {
  readonly png: PNG;
  constructor(
    readonly width: number,
    readonly height: number,
  ) {
    this.png = new PNG({ width, height });
    this.png.data.fill(255);
  }
  set(x: number, y: number, [r, g, b]: [number, number, number]) {
    if (x < 0 || y < 0 || x >= this.width || y >= this.height) return;
    const o = 4 * (y * this.width + x);
    this.png.data[o] = r;
    this.png.data[o + 1] = g;
    this.png.data[o + 2] = b;
    this.png.data[o + 3] = 255;
  }
  text(x: number, y: number, s: string, scale = 2, colour: [number, number, number] = [30, 35, 45]) {
    let cx = x;
    for (const ch of s) {
      const glyph = GLYPHS[ch] ?? GLYPHS[' '];
      for (let gy = 0; gy < 5; gy++)
        for (let gx = 0; gx < 3; gx++)
          if (glyph[gy][gx] === '1')
            for (let a = 0; a < scale; a++)
              for (let b = 0; b < scale; b++) this.set(cx + gx * scale + a, y + gy * scale + b, colour);
      cx += 4 * scale;
    }
  }
  textWidth(s: string, scale = 2) {
    return s.length * 4 * scale - scale;
  }
}

function niceStep(span: number, target: number): number {
  const raw = span / target;
  const p = 10 ** Math.floor(Math.log10(raw));
  for (const m of [1, 2, 5, 10]) if (m * p >= raw) return m * p;
  return 10 * p;
}

const fmt = (v: number) => (Math.abs(v - Math.round(v)) < 1e-9 ? String(Math.round(v)) : v.toFixed(1));

export function renderBtrPng(input: BtrPngInput): Buffer {
  const { levels, rows, grid, timesS } = input;
  const plotRows = Math.min(rows, MAX_PLOT_ROWS);
  const plotHeight = Math.max(plotRows, Math.min(600, rows * 4));
  const width = LEFT + PLOT_WIDTH + RIGHT;
  const height = TOP + plotHeight + BOTTOM;
  const canvas = new Canvas(width, height);
  let hi = -Infinity;
  for (let i = 0; i < levels.length; i++) if (levels[i] > hi) hi = levels[i];
  if (!Number.isFinite(hi)) hi = 0;
  hi = Math.round(hi);
  const lo = hi - DISPLAY_RANGE_DB;
  const endDeg = grid.startDeg + (grid.count - 1) * grid.stepDeg;
  const spanDeg = endDeg - grid.startDeg || 1;
  // Pixel (px, py) shows the maximum over the blocks and grid points that fall in it.
  for (let py = 0; py < plotHeight; py++) {
    const r0 = Math.floor((py * rows) / plotHeight);
    const r1 = Math.max(r0 + 1, Math.floor(((py + 1) * rows) / plotHeight));
    for (let px = 0; px < PLOT_WIDTH; px++) {
      const c0 = Math.floor((px * grid.count) / PLOT_WIDTH);
      const c1 = Math.max(c0 + 1, Math.floor(((px + 1) * grid.count) / PLOT_WIDTH));
      let best = -Infinity;
      for (let r = r0; r < r1; r++)
        for (let c = c0; c < c1; c++) {
          const v = levels[r * grid.count + c];
          if (v > best) best = v;
        }
      canvas.set(LEFT + px, TOP + py, colourOf((best - lo) / (hi - lo)));
    }
  }
  // Tracks: red lines through their filtered bearings.
  const t0 = timesS[0] ?? 0;
  const t1 = timesS[timesS.length - 1] ?? 1;
  const yOf = (t: number) => TOP + Math.round(((t - t0) / (t1 - t0 || 1)) * (plotHeight - 1));
  const xOf = (deg: number) => LEFT + Math.round(((deg - grid.startDeg) / spanDeg) * (PLOT_WIDTH - 1));
  for (const track of input.tracks) {
    for (let i = 0; i < track.points.length; i++) {
      const p = track.points[i];
      const q = track.points[i + 1];
      const steps = q
        ? Math.max(1, Math.abs(yOf(q.tS) - yOf(p.tS)), Math.abs(xOf(q.bearingDeg) - xOf(p.bearingDeg)))
        : 1;
      for (let s = 0; s < steps; s++) {
        const f = s / steps;
        const deg = q ? p.bearingDeg + f * (q.bearingDeg - p.bearingDeg) : p.bearingDeg;
        const t = q ? p.tS + f * (q.tS - p.tS) : p.tS;
        canvas.set(xOf(deg), yOf(t), TRACK);
        canvas.set(xOf(deg) + 1, yOf(t), TRACK);
      }
    }
  }
  // Frame and ticks.
  const ink: [number, number, number] = [30, 35, 45];
  for (let x = LEFT - 1; x <= LEFT + PLOT_WIDTH; x++) {
    canvas.set(x, TOP - 1, ink);
    canvas.set(x, TOP + plotHeight, ink);
  }
  for (let y = TOP - 1; y <= TOP + plotHeight; y++) {
    canvas.set(LEFT - 1, y, ink);
    canvas.set(LEFT + PLOT_WIDTH, y, ink);
  }
  const degStep = spanDeg >= 120 ? 30 : niceStep(spanDeg, 6);
  for (let d = Math.ceil(grid.startDeg / degStep) * degStep; d <= endDeg + 1e-9; d += degStep) {
    const x = xOf(d);
    for (let k = 1; k <= 5; k++) canvas.set(x, TOP - 1 - k, ink);
    const label = `${fmt(d)}°`;
    canvas.text(x - Math.floor(canvas.textWidth(label) / 2), TOP - 18, label);
  }
  const tStep = niceStep(t1 - t0 || 1, 8);
  for (let t = Math.ceil(t0 / tStep) * tStep; t <= t1 + 1e-9; t += tStep) {
    const y = yOf(t);
    for (let k = 1; k <= 5; k++) canvas.set(LEFT - 1 - k, y, ink);
    const label = `${fmt(t)}s`;
    canvas.text(LEFT - 9 - canvas.textWidth(label), y - 5, label);
  }
  // Colour bar with its dB scale.
  const barX = LEFT + PLOT_WIDTH + 12;
  for (let y = 0; y < plotHeight; y++) {
    const c = colourOf(1 - y / Math.max(1, plotHeight - 1));
    for (let x = 0; x < BAR_WIDTH; x++) canvas.set(barX + x, TOP + y, c);
  }
  for (let db = 0; db <= DISPLAY_RANGE_DB; db += 10) {
    const y = TOP + Math.round((db / DISPLAY_RANGE_DB) * (plotHeight - 1));
    for (let k = 0; k < 4; k++) canvas.set(barX + BAR_WIDTH + k, y, ink);
    canvas.text(barX + BAR_WIDTH + 6, y - 5, (Math.round(hi) - db).toFixed(0));
  }
  canvas.text(barX + BAR_WIDTH + 6, TOP - 18, 'dB');
  return PNG.sync.write(canvas.png);
}
