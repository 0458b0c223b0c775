'use client';

/**
 * One ECharts chart on the page, from an option built by lib/charts: SVG
 * renderer, resizes with its box, zoom by wheel and by dragging a box (reset
 * and preset windows as buttons), a tooltip readout of the values under the
 * pointer, legend toggles, and PNG/SVG (and optionally CSV) export of the view.
 *
 * For tests the container carries the horizontal zoom window and the plot's
 * pixel edges as data-* attributes (data-zoom-from/-to in axis units,
 * data-plot-left/-right/-top/-bottom in pixels from the container's corner).
 */
import { useEffect, useMemo, useRef, useState } from 'react';
import type { ECharts } from 'echarts/core';
import { echarts } from '@/lib/charts/echarts';
import { withInteraction, ZOOM_X, type ChartOption, type ZoomSpec } from '@/lib/charts';
import { downloadBlob, svgToPngBlob } from '@/lib/designer/export';
import { cn } from '@/lib/client/cn';

export interface ZoomPreset {
  label: string;
  /** Axis window, or null for the full axis. */
  window: { from: number; to: number } | null;
  testId?: string;
}

export interface ChartProps {
  option: ChartOption;
  /** Height in CSS pixels; the width follows the container. */
  height: number;
  ariaLabel: string;
  /** File name of exports, without extension. */
  exportName: string;
  /** Prefix of the export buttons' test ids (`<prefix>-export-svg`, …). */
  testIdPrefix: string;
  zoom?: ZoomSpec | false;
  zoomPresets?: ZoomPreset[];
  csv?: () => string;
  className?: string;
  /** Extra attributes for tests on the chart container. */
  dataAttributes?: Record<`data-${string}`, string>;
}

type Frame = { from?: number; to?: number; left: number; right: number; top: number; bottom: number };

function gridEdges(option: ChartOption, width: number, height: number) {
  const grid = (Array.isArray(option.grid) ? option.grid[0] : option.grid) ?? {};
  const px = (v: unknown, fallback: number) => (typeof v === 'number' ? v : fallback);
  return {
    left: px(grid.left, 60),
    right: width - px(grid.right, 20),
    top: px(grid.top, 40),
    bottom: height - px(grid.bottom, 40),
  };
}

export function Chart({
  option,
  height,
  ariaLabel,
  exportName,
  testIdPrefix,
  zoom = false,
  zoomPresets,
  csv,
  className,
  dataAttributes,
}: ChartProps) {
  const box = useRef<HTMLDivElement>(null);
  const chartRef = useRef<ECharts | null>(null);
  const [frame, setFrame] = useState<Frame | null>(null);
  const [error, setError] = useState<string | null>(null);
  const full = useMemo(() => withInteraction(option, zoom), [option, zoom]);
  const hasCartesian = option.xAxis !== undefined;

  useEffect(() => {
    const el = box.current;
    if (!el) return;
    const chart = echarts.init(el, null, { renderer: 'svg' });
    chartRef.current = chart;
    const observer = new ResizeObserver(() => chart.resize());
    observer.observe(el);
    return () => {
      observer.disconnect();
      chart.dispose();
      chartRef.current = null;
    };
  }, []);

  useEffect(() => {
    const chart = chartRef.current;
    const el = box.current;
    if (!chart || !el) return;
    const update = () => {
      const edges = gridEdges(full, chart.getWidth(), chart.getHeight());
      let from: number | undefined;
      let to: number | undefined;
      if (hasCartesian) {
        const a = chart.convertFromPixel({ xAxisIndex: 0 }, edges.left);
        const b = chart.convertFromPixel({ xAxisIndex: 0 }, edges.right);
        if (Number.isFinite(a) && Number.isFinite(b)) [from, to] = [a as number, b as number];
      }
      setFrame({ from, to, ...edges });
    };
    chart.setOption(full, { notMerge: true });
    if (zoom) chart.dispatchAction({ type: 'takeGlobalCursor', key: 'dataZoomSelect', dataZoomSelectActive: true });
    chart.on('datazoom', update);
    chart.on('finished', update);
    update();
    return () => {
      chart.off('datazoom', update);
      chart.off('finished', update);
    };
  }, [full, zoom, hasCartesian]);

  const zoomTo = (w: ZoomPreset['window']) => {
    const chart = chartRef.current;
    if (!chart) return;
    chart.dispatchAction(
      w
        ? { type: 'dataZoom', dataZoomId: ZOOM_X, startValue: w.from, endValue: w.to }
        : { type: 'dataZoom', dataZoomId: ZOOM_X, start: 0, end: 100 },
    );
  };

  /** The option as seen: the current horizontal window fixed as the axis range, no zoom tools. */
  const viewOption = (): ChartOption => {
    if (!frame || frame.from === undefined || !hasCartesian || Array.isArray(option.xAxis)) return option;
    return { ...option, xAxis: { ...(option.xAxis as object), min: frame.from, max: frame.to } } as ChartOption;
  };
  const exportSvg = () => {
    const el = box.current!;
    const chart = echarts.init(null, null, { renderer: 'svg', ssr: true, width: el.clientWidth, height });
    try {
      chart.setOption(viewOption());
      return { markup: chart.renderToSVGString(), width: el.clientWidth };
    } finally {
      chart.dispose();
    }
  };
  const saveSvg = () => downloadBlob(new Blob([exportSvg().markup], { type: 'image/svg+xml' }), `${exportName}.svg`);
  const savePng = async () => {
    setError(null);
    try {
      const { markup, width } = exportSvg();
      downloadBlob(await svgToPngBlob(markup, width, height), `${exportName}.png`);
    } catch (e) {
      setError(e instanceof Error ? e.message : 'the PNG could not be made');
    }
  };
  const saveCsv = () => csv && downloadBlob(new Blob([csv()], { type: 'text/csv' }), `${exportName}.csv`);

  const button = 'rounded px-2 py-0.5 text-xs font-medium text-ink-600 ring-1 ring-ink-200 hover:bg-ink-50';
  return (
    <div className={cn('space-y-1', className)}>
      <div className="flex flex-wrap items-center justify-end gap-1">
        {zoom ? (
          <div className="mr-auto flex items-center gap-1" role="group" aria-label="Zoom">
            <span className="text-2xs tracking-wide text-ink-400 uppercase">Zoom</span>
            {(zoomPresets ?? [{ label: 'Reset', window: null }]).map((p) => (
              <button
                key={p.label}
                type="button"
                className={button}
                onClick={() => zoomTo(p.window)}
                data-testid={p.testId ?? `${testIdPrefix}-zoom-reset`}
              >
                {p.label}
              </button>
            ))}
            <span className="text-2xs text-ink-400">wheel or drag a box to zoom</span>
          </div>
        ) : null}
        <div className="flex items-center gap-1" role="group" aria-label="Export">
          <span className="text-2xs tracking-wide text-ink-400 uppercase">Export</span>
          <button type="button" className={button} onClick={saveSvg} data-testid={`${testIdPrefix}-export-svg`}>
            SVG
          </button>
          <button type="button" className={button} onClick={savePng} data-testid={`${testIdPrefix}-export-png`}>
            PNG
          </button>
          {csv ? (
            <button type="button" className={button} onClick={saveCsv} data-testid={`${testIdPrefix}-export-csv`}>
              CSV
            </button>
          ) : null}
        </div>
        {error ? (
          <span role="alert" className="text-xs text-coral-600">
            {error}
          </span>
        ) : null}
      </div>
      <div
        ref={box}
        role="img"
        aria-label={ariaLabel}
        data-testid={`${testIdPrefix}-plot`}
        data-zoom-from={frame?.from ?? ''}
        data-zoom-to={frame?.to ?? ''}
        data-plot-left={frame?.left ?? ''}
        data-plot-right={frame?.right ?? ''}
        data-plot-top={frame?.top ?? ''}
        data-plot-bottom={frame?.bottom ?? ''}
        {...dataAttributes}
        style={{ height }}
        className="w-full"
      />
    </div>
  );
}
