import { describe, expect, it } from 'vitest';
import {
  BTR_COLOURS,
  BTR_IDS,
  bearingTimeOption,
  blockAt,
  clockLabel,
  colourAt,
  colourStops,
  decimateLevels,
  imageExtent,
  imageToRgba,
  levelAt,
  levelRange,
  lightnessOf,
  selectedBlockSeries,
  type BearingTimeImage,
} from '@/lib/charts/bearing-time';
import { renderChartSvg } from '@/lib/charts/ssr';

/** A grid with a distinct, known value in every cell: level = −(r + c/100). */
function grid(rows: number, cols: number, t0 = 0.5, dt = 0.5, b0 = -90, db = 0.5): BearingTimeImage {
  return {
    bearingsDeg: Array.from({ length: cols }, (_, c) => b0 + c * db),
    timesS: Array.from({ length: rows }, (_, r) => t0 + r * dt),
    levelsDb: Array.from({ length: rows }, (_, r) => Array.from({ length: cols }, (_, c) => -(r + c / 100))),
  };
}

describe('colour map', () => {
  const lutSize = BTR_COLOURS.length / 3;
  const rgb = (i: number) => [BTR_COLOURS[3 * i], BTR_COLOURS[3 * i + 1], BTR_COLOURS[3 * i + 2]] as const;

  it('rises in CIE L*, close to linearly from 8 to 96 (its design; consistency check)', () => {
    // L* from the CIE 1976 definition with the sRGB (IEC 61966-2-1) transfer function. Neighbouring
    // entries are 0.35 L* apart, so 8-bit rounding may tie two; four entries apart it must rise.
    let previous = -Infinity;
    for (let i = 0; i < lutSize; i++) {
      const l = lightnessOf(rgb(i));
      expect(l).toBeGreaterThanOrEqual(previous);
      if (i >= 4) expect(l).toBeGreaterThan(lightnessOf(rgb(i - 4)));
      // 8-bit rounding moves L* by well under one unit.
      expect(Math.abs(l - (8 + (88 * i) / (lutSize - 1)))).toBeLessThan(1);
      previous = l;
    }
  });

  it('clamps its position and maps NaN to the darkest colour', () => {
    expect(colourAt(-3)).toEqual(colourAt(0));
    expect(colourAt(7)).toEqual(colourAt(1));
    expect(colourAt(Number.NaN)).toEqual(colourAt(0));
    expect(colourStops(5)).toHaveLength(5);
    expect(colourStops(5)[0]).toMatch(/^#[0-9a-f]{6}$/);
  });

  it('maps levels to pixels: window ends, clamping, NaN transparent, −∞ darkest', () => {
    const image = { levelsDb: [[0, -30, -15, 5, -50, Number.NaN, -Infinity]] };
    const range = { minDb: -30, maxDb: 0 };
    const { width, height, data } = imageToRgba(image, range);
    expect([width, height]).toEqual([7, 1]);
    const px = (c: number) => Array.from(data.slice(4 * c, 4 * c + 4));
    const top = [...colourAt(1), 255];
    const bottom = [...colourAt(0), 255];
    expect(px(0)).toEqual(top);
    expect(px(1)).toEqual(bottom);
    expect(px(2)).toEqual([...colourAt(0.5), 255]);
    expect(px(3)).toEqual(top); // above the window
    expect(px(4)).toEqual(bottom); // below it
    expect(px(5)).toEqual([0, 0, 0, 0]);
    expect(px(6)).toEqual(bottom);
  });

  it('puts the earliest time in the top pixel row', () => {
    const { data } = imageToRgba({ levelsDb: [[0], [-30]] }, { minDb: -30, maxDb: 0 });
    expect(Array.from(data.slice(0, 3))).toEqual(colourAt(1));
    expect(Array.from(data.slice(4, 7))).toEqual(colourAt(0));
  });

  it('refuses a ragged grid, naming the row', () => {
    expect(() => imageToRgba({ levelsDb: [[0, 1], [0]] }, { minDb: 0, maxDb: 1 })).toThrow(/row 1 has 1 values/);
  });

  it('spans the dynamic range below the largest finite level', () => {
    expect(
      levelRange(
        {
          levelsDb: [
            [-3, Number.NaN],
            [-Infinity, -40],
          ],
        },
        20,
      ),
    ).toEqual({ minDb: -23, maxDb: -3 });
    expect(levelRange({ levelsDb: [] })).toEqual({ minDb: -30, maxDb: 0 });
  });
});

describe('readout', () => {
  const image = grid(40, 361);

  it('reads the grid value of the cell under the pointer, not an interpolation', () => {
    for (const [r, c] of [
      [0, 0],
      [17, 200],
      [39, 360],
      [5, 181],
    ]) {
      const bearing = image.bearingsDeg[c];
      const t = image.timesS[r];
      // anywhere inside the cell, short of its edges
      for (const [db, dt] of [
        [0, 0],
        [0.2, 0.2],
        [-0.2, -0.2],
      ]) {
        const out = levelAt(image, bearing + db, t + dt);
        expect(out).not.toBeNull();
        expect(out!.levelDb).toBe(image.levelsDb[r][c]);
        expect([out!.row, out!.col, out!.bearingDeg, out!.tS]).toEqual([r, c, bearing, t]);
      }
    }
  });

  it('is null outside the image and for non-finite input', () => {
    const ext = imageExtent(image);
    expect(ext.bearing).toEqual([-90.25, 90.25]);
    expect(ext.time).toEqual([0.25, 20.25]);
    expect(levelAt(image, -90.3, 1)).toBeNull();
    expect(levelAt(image, 0, 20.3)).toBeNull();
    expect(levelAt(image, Number.NaN, 1)).toBeNull();
    expect(levelAt(image, -90.25, 0.25)?.levelDb).toBe(image.levelsDb[0][0]);
  });

  it('finds the block of a time: nearest centre among the overlapping blocks', () => {
    // 1 s blocks, 50 % overlap: centres at 0.5, 1.0, 1.5, …
    const blocks = Array.from({ length: 10 }, (_, b) => ({ startS: 0.5 * b, endS: 0.5 * b + 1 }));
    expect(blockAt(blocks, 0.5)).toBe(0);
    expect(blockAt(blocks, 1.1)).toBe(1);
    expect(blockAt(blocks, 1.4)).toBe(2);
    expect(blockAt(blocks, 5.5)).toBe(9);
    expect(blockAt(blocks, 5.6)).toBe(-1);
    expect(blockAt([], 1)).toBe(-1);
  });

  it('labels times as m:ss', () => {
    expect(clockLabel(0)).toBe('0:00.0');
    expect(clockLabel(75.25)).toBe('1:15.3');
    expect(clockLabel(3725, 0)).toBe('1:02:05');
    expect(clockLabel(119.6, 0)).toBe('2:00');
    expect(clockLabel(59.96)).toBe('1:00.0');
  });
});

describe('decimation', () => {
  it('keeps the maximum of each group, so a one-cell track survives', () => {
    const image = grid(1500, 361);
    for (let r = 0; r < 1500; r++) image.levelsDb[r][100 + Math.floor(r / 10)] = 10; // a drifting track
    const before = JSON.stringify(image);
    const small = decimateLevels(image, 250, 120);
    expect(JSON.stringify(image)).toBe(before); // input untouched
    expect(small.timesS).toHaveLength(250);
    expect(small.bearingsDeg).toHaveLength(120);
    expect(small.levelsDb).toHaveLength(250);
    for (const row of small.levelsDb) {
      expect(row).toHaveLength(120);
      expect(Math.max(...row)).toBe(10);
    }
    // Each cell is the largest of its 6 × ~3 group.
    const r = 123;
    const cols = [0, 1, 2, 3].map((c) => Math.round((c * 361) / 120));
    let expected = -Infinity;
    for (let i = 6 * r; i < 6 * r + 6; i++)
      for (let k = cols[0]; k < cols[1]; k++) expected = Math.max(expected, image.levelsDb[i][k]);
    expect(small.levelsDb[r][0]).toBe(expected);
    // Axis values are group means: times of rows 6r…6r+5.
    expect(small.timesS[r]).toBeCloseTo(0.5 + 0.5 * (6 * r + 2.5), 12);
  });

  it('returns a grid that already fits unchanged and ignores NaN cells', () => {
    const image = grid(10, 10);
    expect(decimateLevels(image, 10, 10)).toBe(image);
    image.levelsDb[0][0] = Number.NaN;
    const out = decimateLevels(image, 5, 5);
    expect(out.levelsDb[0][0]).toBe(Math.max(image.levelsDb[0][1], image.levelsDb[1][0], image.levelsDb[1][1]));
    expect(() => decimateLevels(image, 0, 5)).toThrow(RangeError);
  });
});

describe('option', () => {
  const image = grid(120, 361);
  const blocks = image.timesS.map((t) => ({ startS: t - 0.5, endS: t + 0.5, bearingsDeg: [-20, 30], stdDeg: [1, 1] }));
  const tracks = [
    { id: 1, points: image.timesS.map((t) => ({ tS: t, bearingDeg: -20 + t })) },
    { id: 2, points: image.timesS.map((t) => ({ tS: t, bearingDeg: 30 })) },
  ];
  const option = bearingTimeOption({
    image,
    imageHref: 'data:image/png;base64,AAAA',
    range: levelRange(image),
    tracks,
    blocks,
    selectedBlock: 3,
    height: 520,
  });

  it('has bearing across, time down, zoom on both axes and a colour bar over the level window', () => {
    const o = option as Record<string, unknown> & {
      yAxis: { inverse: boolean; min: number; max: number };
      xAxis: { min: number; max: number };
      dataZoom: { id: string; xAxisIndex?: number; yAxisIndex?: number }[];
      visualMap: { min: number; max: number; inRange: { color: string[] } };
    };
    expect(o.yAxis.inverse).toBe(true);
    expect([o.xAxis.min, o.xAxis.max]).toEqual([-90.25, 90.25]);
    expect([o.yAxis.min, o.yAxis.max]).toEqual([0.25, 60.25]);
    const ids = o.dataZoom.map((z) => z.id);
    expect(ids).toContain(BTR_IDS.zoomBearing);
    expect(ids).toContain(BTR_IDS.zoomTime);
    expect(o.dataZoom.some((z) => z.yAxisIndex === 0)).toBe(true);
    expect(o.dataZoom.some((z) => z.xAxisIndex === 0)).toBe(true);
    expect([o.visualMap.min, o.visualMap.max]).toEqual([-30, 0]);
    expect(o.visualMap.inRange.color[0]).toBe(colourStops(24)[0]);
  });

  it('draws one line per track, in (bearing, time) order, over the image', () => {
    const series = (option.series as { id: string; data: unknown[]; z?: number }[]).filter((s) =>
      s.id.startsWith('track:'),
    );
    expect(series.map((s) => s.id)).toEqual(['track:1', 'track:2']);
    expect(series[0].data[2]).toEqual([-20 + image.timesS[2], image.timesS[2]]);
    const imageZ = (option.series as { id: string; z?: number }[]).find((s) => s.id === BTR_IDS.image)!.z!;
    expect(series.every((s) => (s.z ?? 0) > imageZ)).toBe(true);
  });

  it('renders to SVG as one stretched image element with the tracks and colour bar', () => {
    const svg = renderChartSvg(option, { width: 800, height: 520 });
    const images = svg.match(/<image\b[^>]*>/g) ?? [];
    expect(images).toHaveLength(1);
    expect(images[0]).toContain('width="361"');
    expect(images[0]).toContain('height="120"');
    expect(images[0]).toMatch(/transform="matrix\(/);
    expect(svg).toContain('0 dB');
    expect(svg).toContain('-30 dB');
  });

  it('highlights the selected block over its time span, and nothing without one', () => {
    const sel = selectedBlockSeries(blocks, 3);
    expect(sel.id).toBe(BTR_IDS.selected);
    expect(sel.data).toEqual([[0, blocks[3].startS, blocks[3].endS]]);
    expect(selectedBlockSeries(blocks, null).data).toEqual([]);
    expect(selectedBlockSeries(blocks, 999).data).toEqual([]);
    const svg = renderChartSvg(option, { width: 800, height: 520 });
    expect(svg).toMatch(/stroke-dasharray="5,3"/);
  });

  it('draws no image when there are no pixels yet', () => {
    const bare = bearingTimeOption({ image, imageHref: null, range: levelRange(image), height: 400 });
    expect(renderChartSvg(bare, { width: 600, height: 400 })).not.toContain('<image');
  });
});
