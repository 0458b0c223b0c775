'use client';

/** Download buttons for one chart: the figure as SVG or PNG, and its data as CSV. */
import { useState } from 'react';
import { downloadBlob, svgMarkup, svgToPngBlob } from '@/lib/designer/export';

export interface ExportMenuProps {
  /** The chart's <svg>. */
  svgRef: React.RefObject<SVGSVGElement | null>;
  /** File name without extension. */
  baseName: string;
  /** Builds the CSV when asked (omit to hide the CSV button). */
  csv?: () => string;
  testIdPrefix: string;
}

export function ExportMenu({ svgRef, baseName, csv, testIdPrefix }: ExportMenuProps) {
  const [error, setError] = useState<string | null>(null);
  const button = 'rounded px-2 py-0.5 text-xs font-medium text-ink-600 ring-1 ring-ink-200 hover:bg-ink-50';

  const saveSvg = () => {
    const svg = svgRef.current;
    if (!svg) return;
    downloadBlob(new Blob([svgMarkup(svg)], { type: 'image/svg+xml' }), `${baseName}.svg`);
  };
  const savePng = async () => {
    const svg = svgRef.current;
    if (!svg) return;
    setError(null);
    try {
      const box = svg.viewBox.baseVal;
      const blob = await svgToPngBlob(svgMarkup(svg), box.width || svg.clientWidth, box.height || svg.clientHeight);
      downloadBlob(blob, `${baseName}.png`);
    } catch (e) {
      setError(e instanceof Error ? e.message : 'the PNG could not be made');
    }
  };
  const saveCsv = () => {
    if (!csv) return;
    downloadBlob(new Blob([csv()], { type: 'text/csv' }), `${baseName}.csv`);
  };

  return (
    <div className="flex items-center gap-1" role="group" aria-label="Export">
      <span className="text-2xs uppercase tracking-wide text-ink-400">Export</span>
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
      {error ? (
        <span role="alert" className="text-xs text-coral-600">
          {error}
        </span>
      ) : null}
    </div>
  );
}
