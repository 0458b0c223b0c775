/**
 * What the page adds to a chart option and an exported or bundled figure does
 * not need: zoom by wheel and by dragging a box (ECharts dataZoom, with the
 * toolbox's box-zoom and reset tools), optionally opening on a window.
 */
import type { ChartOption } from './common';

export interface ZoomSpec {
  /** Zoom the horizontal axis (default true). */
  x?: boolean;
  /** Zoom the vertical axis too (default false). */
  y?: boolean;
  /** The horizontal window to open on, in axis units. */
  initial?: { from: number; to: number } | null;
}

/** Ids of the dataZoom components, for dispatchAction and for reading the window back. */
export const ZOOM_X = 'zoom-x';
export const ZOOM_Y = 'zoom-y';

export function withInteraction(option: ChartOption, zoom: ZoomSpec | false): ChartOption {
  if (!zoom) return option;
  const zoomX = zoom.x !== false;
  const inside = {
    type: 'inside' as const,
    filterMode: 'none' as const,
    zoomOnMouseWheel: true,
    moveOnMouseMove: false,
    moveOnMouseWheel: false,
  };
  const dataZoom = [
    ...(zoomX
      ? [
          {
            ...inside,
            id: ZOOM_X,
            xAxisIndex: 0,
            ...(zoom.initial ? { startValue: zoom.initial.from, endValue: zoom.initial.to } : {}),
          },
        ]
      : []),
    ...(zoom.y ? [{ ...inside, id: ZOOM_Y, yAxisIndex: 0 }] : []),
  ];
  return {
    ...option,
    dataZoom,
    toolbox: {
      left: 4,
      top: 0,
      itemSize: 13,
      feature: {
        dataZoom: {
          xAxisIndex: zoomX ? 0 : false,
          yAxisIndex: zoom.y ? 0 : false,
          title: { zoom: 'Drag a box to zoom', back: 'Undo zoom' },
        },
        restore: { title: 'Reset' },
      },
    },
  };
}
