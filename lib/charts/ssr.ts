/**
 * Server-side SVG of a chart option: ECharts' SSR mode with the SVG renderer,
 * no DOM. The hand-off bundle draws its figures through this, from the same
 * option builders the pages use, so both look and read the same.
 */
import { echarts } from './echarts';
import type { ChartOption, ChartSize } from './common';

export function renderChartSvg(option: ChartOption, size: ChartSize): string {
  const chart = echarts.init(null, null, { renderer: 'svg', ssr: true, width: size.width, height: size.height });
  try {
    chart.setOption(option);
    return stableClassNames(chart.renderToSVGString());
  } finally {
    chart.dispose();
  }
}

/**
 * zrender names its CSS classes and clip paths from counters that run on across renders
 * (zr0-cls-10, zr2-cls-3, …). Renumbered in order of first appearance, the
 * same option gives the same bytes, so a bundle's checksums repeat.
 */
function stableClassNames(svg: string): string {
  const names = new Map<string, string>();
  return svg
    .replace(/\bzr\d+-cls-\d+\b/g, (name) => {
      let stable = names.get(name);
      if (!stable) names.set(name, (stable = `chart-cls-${names.size}`));
      return stable;
    })
    .replace(/\bzr\d+-([a-z]+\d+)\b/g, 'chart-$1');
}
