/**
 * Export of the designer's figures and data.
 *  - patternCsv / separationCsv: pure, usable anywhere (tested in node).
 *  - svgToPngBlob, downloadBlob: browser only (they need the DOM);
 *    call them from event handlers of client components.
 * Chart images (SVG, PNG) are made by components/charts/chart.tsx from the
 * chart's ECharts option.
 */

export interface CsvPattern {
  thetaDeg: ArrayLike<number>;
  valuesDb: ArrayLike<number>;
}

/** Quotes a CSV field when it holds a comma, quote or line break. */
function csvField(v: string): string {
  return /[",\r\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v;
}

/**
 * Beam pattern as CSV: `# key: value` comment lines for the metadata, then a
 * header `theta_deg,u,level_db` and one row per grid point, full precision.
 */
export function patternCsv(pattern: CsvPattern, meta: Record<string, string | number> = {}): string {
  if (pattern.thetaDeg.length !== pattern.valuesDb.length) {
    throw new RangeError(`thetaDeg has ${pattern.thetaDeg.length} values but valuesDb has ${pattern.valuesDb.length}`);
  }
  const lines: string[] = [];
  for (const [k, v] of Object.entries(meta)) lines.push(`# ${k}: ${String(v).replace(/[\r\n]+/g, ' ')}`);
  lines.push('theta_deg,u,level_db');
  for (let i = 0; i < pattern.thetaDeg.length; i++) {
    const t = pattern.thetaDeg[i];
    lines.push(`${t},${Math.sin((t * Math.PI) / 180)},${pattern.valuesDb[i]}`);
  }
  return lines.join('\n') + '\n';
}

/** Any table of named numeric columns as CSV (NaN written as an empty field). */
export function columnsCsv(columns: Record<string, ArrayLike<number>>): string {
  const names = Object.keys(columns);
  const len = names.length ? columns[names[0]].length : 0;
  for (const n of names)
    if (columns[n].length !== len) throw new RangeError(`column ${n} has ${columns[n].length} values, expected ${len}`);
  const lines = [names.map(csvField).join(',')];
  for (let i = 0; i < len; i++)
    lines.push(names.map((n) => (Number.isFinite(columns[n][i]) ? String(columns[n][i]) : '')).join(','));
  return lines.join('\n') + '\n';
}

/** A file name from free text: lower-case letters, digits and hyphens. */
export function fileSlug(text: string, fallback = 'array'): string {
  const s = text
    .normalize('NFKD')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 60);
  return s || fallback;
}

/** Renders SVG markup to a PNG blob through an off-screen canvas. Browser only. */
export async function svgToPngBlob(markup: string, width: number, height: number, scale = 2): Promise<Blob> {
  const url = URL.createObjectURL(new Blob([markup], { type: 'image/svg+xml;charset=utf-8' }));
  try {
    const img = new Image();
    img.decoding = 'async';
    await new Promise<void>((resolve, reject) => {
      img.onload = () => resolve();
      img.onerror = () => reject(new Error('the chart could not be rendered to an image'));
      img.src = url;
    });
    const canvas = document.createElement('canvas');
    canvas.width = Math.round(width * scale);
    canvas.height = Math.round(height * scale);
    const ctx = canvas.getContext('2d');
    if (!ctx) throw new Error('this browser has no 2D canvas');
    ctx.fillStyle = '#ffffff';
    ctx.fillRect(0, 0, canvas.width, canvas.height);
    ctx.drawImage(img, 0, 0, canvas.width, canvas.height);
    return await new Promise<Blob>((resolve, reject) =>
      canvas.toBlob((b) => (b ? resolve(b) : reject(new Error('the PNG could not be encoded'))), 'image/png'),
    );
  } finally {
    URL.revokeObjectURL(url);
  }
}

/** Starts a download of a blob under a file name. Browser only. */
export function downloadBlob(blob: Blob, fileName: string): void {
  const url = URL.createObjectURL(blob);
  const a = document.createElement('a');
  a.href = url;
  a.download = fileName;
  a.rel = 'noopener';
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}
