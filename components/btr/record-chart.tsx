'use client';

/**
 * The bearing–time record on the page: the level grid painted once to a canvas
 * and drawn as one image (lib/charts/bearing-time.ts), the tracks over it, a
 * colour bar, zoom on both axes (wheel, box, sliders), a readout of the grid
 * cell under the pointer, and a click that picks the block at that time.
 *
 * For tests the plot box carries the plot's pixel edges (data-plot-left/-right/
 * -top/-bottom), the zoom windows (data-bearing-from/-to, data-time-from/-to) and
 * the readout row its values (data-time, data-bearing, data-db, data-row, data-col).
 */
import { useEffect, useMemo, useRef, useState } from 'react';
import type { ECharts } from 'echarts/core';
import { echarts } from '@/lib/charts/echarts';
import {
  BTR_GRID,
  BTR_IDS,
  bearingTimeOption,
  blockAt,
  clockLabel,
  decimateLevels,
  imageToRgba,
  levelAt,
  levelRange,
  selectedBlockSeries,
  trackColour,
  type LevelReadout,
} from '@/lib/charts/bearing-time';
import { useHydrated } from '@/lib/client/use-hydrated';
import type { BtrBlock, BtrImage, BtrTrack } from './types';

/** The canvas holds at most this many cells; larger grids are max-pooled first. */
const MAX_ROWS = 1600;
const MAX_COLS = 1000;
const RANGES_DB = [20, 30, 40, 60];

type Frame = {
  left: number;
  right: number;
  top: number;
  bottom: number;
  bearing: [number, number];
  time: [number, number];
};

export function RecordChart({
  image,
  blocks,
  tracks,
  rowSeconds,
  selectedBlock,
  onSelectBlock,
  height = 560,
}: {
  image: BtrImage;
  blocks: BtrBlock[];
  tracks: BtrTrack[];
  rowSeconds: number;
  selectedBlock: number | null;
  onSelectBlock: (index: number) => void;
  height?: number;
}) {
  const box = useRef<HTMLDivElement>(null);
  const chartRef = useRef<ECharts | null>(null);
  const [dynamicRange, setDynamicRange] = useState(30);
  const [showBlockBearings, setShowBlockBearings] = useState(true);
  const [readout, setReadout] = useState<(LevelReadout & { block: number }) | null>(null);
  const [frame, setFrame] = useState<Frame | null>(null);

  const display = useMemo(() => decimateLevels(image, MAX_ROWS, MAX_COLS), [image]);
  const range = useMemo(() => levelRange(display, dynamicRange), [display, dynamicRange]);

  // Paint the grid once per grid or colour window (in the browser only); zoom and pan never repaint it.
  const hydrated = useHydrated();
  const href = useMemo(() => {
    if (!hydrated) return null;
    const { width, height: rows, data } = imageToRgba(display, range);
    if (!width || !rows) return null;
    const canvas = document.createElement('canvas');
    canvas.width = width;
    canvas.height = rows;
    canvas.getContext('2d')!.putImageData(new ImageData(data, width, rows), 0, 0);
    return canvas.toDataURL('image/png');
  }, [hydrated, display, range]);

  const option = useMemo(
    () =>
      bearingTimeOption({
        image: display,
        imageHref: href,
        range,
        tracks,
        blocks,
        showBlockBearings,
        height,
        rowSeconds,
      }),
    [display, href, range, tracks, blocks, showBlockBearings, height, rowSeconds],
  );

  // Latest values for the pointer handlers, which are bound once.
  const latest = useRef({ display, blocks, rowSeconds, onSelectBlock });
  useEffect(() => {
    latest.current = { display, blocks, rowSeconds, onSelectBlock };
  });

  useEffect(() => {
    const el = box.current;
    if (!el) return;
    const chart = echarts.init(el, null, { renderer: 'svg' });
    chartRef.current = chart;
    const observer = new ResizeObserver(() => chart.resize());
    observer.observe(el);
    const at = (x: number, y: number) => {
      if (!chart.containPixel({ gridIndex: 0 }, [x, y])) return null;
      const [b, t] = chart.convertFromPixel({ gridIndex: 0 }, [x, y]) as number[];
      return { b, t };
    };
    const zr = chart.getZr();
    zr.on('mousemove', (e) => {
      const p = at(e.offsetX, e.offsetY);
      const { display: grid, blocks: list, rowSeconds: rs } = latest.current;
      const cell = p ? levelAt(grid, p.b, p.t, rs) : null;
      setReadout(cell ? { ...cell, block: blockAt(list, p!.t) } : null);
    });
    // Cleared when the pointer leaves the box (zrender's own globalout also fires when the drawing is redone under a still pointer).
    const leave = () => setReadout(null);
    el.addEventListener('mouseleave', leave);
    zr.on('click', (e) => {
      const p = at(e.offsetX, e.offsetY);
      if (!p) return;
      const index = blockAt(latest.current.blocks, p.t);
      if (index >= 0) latest.current.onSelectBlock(index);
    });
    return () => {
      el.removeEventListener('mouseleave', leave);
      observer.disconnect();
      chart.dispose();
      chartRef.current = null;
    };
  }, []);

  const first = useRef(true);
  useEffect(() => {
    const chart = chartRef.current;
    if (!chart) return;
    const update = () => {
      const w = chart.getWidth();
      const h = chart.getHeight();
      const left = BTR_GRID.left;
      const right = w - BTR_GRID.right;
      const top = BTR_GRID.top;
      const bottom = h - BTR_GRID.bottom;
      const [b0, t0] = chart.convertFromPixel({ gridIndex: 0 }, [left, top]) as number[];
      const [b1, t1] = chart.convertFromPixel({ gridIndex: 0 }, [right, bottom]) as number[];
      setFrame({ left, right, top, bottom, bearing: [b0, b1], time: [t0, t1] });
    };
    // The first drawing replaces everything; later ones keep the zoom windows and swap the series.
    chart.setOption(option, first.current ? { notMerge: true } : { replaceMerge: ['series'] });
    first.current = false;
    chart.on('datazoom', update);
    chart.on('finished', update);
    update();
    return () => {
      chart.off('datazoom', update);
      chart.off('finished', update);
    };
  }, [option]);

  useEffect(() => {
    chartRef.current?.setOption({ series: [selectedBlockSeries(blocks, selectedBlock)] });
  }, [blocks, selectedBlock, option]);

  const resetZoom = () => {
    const chart = chartRef.current;
    if (!chart) return;
    for (const id of [BTR_IDS.zoomBearing, BTR_IDS.zoomTime])
      chart.dispatchAction({ type: 'dataZoom', dataZoomId: id, start: 0, end: 100 });
  };

  const button = 'rounded px-2 py-0.5 text-xs font-medium text-ink-600 ring-1 ring-ink-200 hover:bg-ink-50';
  return (
    <div className="space-y-2">
      <div className="flex flex-wrap items-center gap-x-4 gap-y-2 text-xs text-ink-600">
        <div className="flex items-center gap-1" role="group" aria-label="Zoom">
          <span className="text-2xs tracking-wide text-ink-400 uppercase">Zoom</span>
          <button type="button" className={button} onClick={resetZoom} data-testid="btr-zoom-reset">
            Reset
          </button>
          <span className="text-2xs text-ink-400">wheel, the sliders, or the box tool (top left)</span>
        </div>
        <label className="flex items-center gap-1">
          <span className="text-2xs tracking-wide text-ink-400 uppercase">Colour span</span>
          <select
            className="rounded border border-ink-200 bg-white px-1.5 py-0.5 text-xs"
            value={dynamicRange}
            onChange={(e) => setDynamicRange(Number(e.target.value))}
            data-testid="btr-range"
          >
            {RANGES_DB.map((r) => (
              <option key={r} value={r}>
                {r} dB
              </option>
            ))}
          </select>
        </label>
        <label className="flex items-center gap-1.5">
          <input
            type="checkbox"
            checked={showBlockBearings}
            onChange={(e) => setShowBlockBearings(e.target.checked)}
            data-testid="btr-show-bearings"
          />
          block bearings (dots)
        </label>
        <ul className="flex flex-wrap items-center gap-3" aria-label="Tracks">
          {tracks.map((t, i) => (
            <li key={t.id} className="flex items-center gap-1">
              <span
                aria-hidden
                className="inline-block h-0.5 w-4 rounded"
                style={{ background: trackColour(i), boxShadow: '0 0 0 1px rgba(17,28,40,0.5)' }}
              />
              track {t.id}
            </li>
          ))}
        </ul>
      </div>
      <div
        className="flex min-h-7 flex-wrap items-center gap-x-4 rounded-md bg-ink-50 px-3 py-1 font-mono text-xs text-ink-700 tabular"
        aria-live="off"
        data-testid="btr-readout"
        data-time={readout?.tS ?? ''}
        data-bearing={readout?.bearingDeg ?? ''}
        data-db={readout?.levelDb ?? ''}
        data-row={readout?.row ?? ''}
        data-col={readout?.col ?? ''}
        data-block={readout?.block ?? ''}
      >
        {readout ? (
          <>
            <span>
              t = {clockLabel(readout.tS)} ({readout.tS.toFixed(2)} s)
            </span>
            <span>θ = {readout.bearingDeg.toFixed(2)}°</span>
            <span>{Number.isFinite(readout.levelDb) ? `${readout.levelDb.toFixed(2)} dB` : 'no value'}</span>
            {readout.block >= 0 ? (
              <span className="text-ink-500">block {readout.block + 1} · click for detail</span>
            ) : null}
          </>
        ) : (
          <span className="font-sans text-ink-400">
            Point at the record to read time, bearing and level; click to open that block.
          </span>
        )}
      </div>
      <div
        ref={box}
        role="img"
        aria-label={`Bearing–time record: ${display.timesS.length} rows by ${display.bearingsDeg.length} bearings, ${tracks.length} tracks`}
        data-testid="btr-plot"
        data-plot-left={frame?.left ?? ''}
        data-plot-right={frame?.right ?? ''}
        data-plot-top={frame?.top ?? ''}
        data-plot-bottom={frame?.bottom ?? ''}
        data-bearing-from={frame?.bearing[0] ?? ''}
        data-bearing-to={frame?.bearing[1] ?? ''}
        data-time-from={frame?.time[0] ?? ''}
        data-time-to={frame?.time[1] ?? ''}
        data-image-ready={href ? 'true' : 'false'}
        style={{ height }}
        className="w-full cursor-crosshair"
      />
    </div>
  );
}
