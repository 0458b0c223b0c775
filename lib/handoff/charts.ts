/**
 * Server-side SVG figures for hand-off bundles: the beam pattern and the
 * separation-versus-aperture chart, drawn as plain SVG text from the numbers
 * lib/designer/analysis.ts computes with lib/doa (no DOM, no React).
 *
 * Angles in degrees from broadside (docs/conventions.md §1); pattern levels in dB
 * relative to the main-lobe peak; separations in degrees centred on the look
 * direction (as the designer's chart).
 */
import { designPattern, pairAdvice, separationCurves, chartLookDeg, type PairAdvice } from '@/lib/designer/analysis';
import { draftSpacingWavelengths, type DesignerDraft } from '@/lib/designer/state';

const W = 720;
const H = 420;
const PAD = { left: 64, right: 24, top: 44, bottom: 56 };
const PLOT_W = W - PAD.left - PAD.right;
const PLOT_H = H - PAD.top - PAD.bottom;

const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
const num = (v: number) => (Math.round(v * 100) / 100).toString();

function frame(title: string, subtitle: string, body: string[], xLabel: string, yLabel: string): string {
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}" font-family="Helvetica, Arial, sans-serif" font-size="11">`,
    `<title>${esc(title)}</title>`,
    `<rect x="0" y="0" width="${W}" height="${H}" fill="#ffffff"/>`,
    `<text x="${PAD.left}" y="20" font-size="14" font-weight="600" fill="#111827">${esc(title)}</text>`,
    `<text x="${PAD.left}" y="36" fill="#4b5563">${esc(subtitle)}</text>`,
    `<rect x="${PAD.left}" y="${PAD.top}" width="${PLOT_W}" height="${PLOT_H}" fill="none" stroke="#9ca3af"/>`,
    ...body,
    `<text x="${PAD.left + PLOT_W / 2}" y="${H - 14}" text-anchor="middle" fill="#111827">${esc(xLabel)}</text>`,
    `<text x="16" y="${PAD.top + PLOT_H / 2}" text-anchor="middle" fill="#111827" transform="rotate(-90 16 ${PAD.top + PLOT_H / 2})">${esc(yLabel)}</text>`,
    '</svg>',
    '',
  ].join('\n');
}

/** A polyline path through finite points; gaps where a value is not finite. */
function pathOf(
  xs: ArrayLike<number>,
  ys: ArrayLike<number>,
  sx: (v: number) => number,
  sy: (v: number) => number,
): string {
  let d = '';
  let pen = false;
  for (let i = 0; i < xs.length; i++) {
    const x = xs[i];
    const y = ys[i];
    if (!Number.isFinite(x) || !Number.isFinite(y)) {
      pen = false;
      continue;
    }
    d += `${pen ? 'L' : 'M'}${num(sx(x))},${num(sy(y))}`;
    pen = true;
  }
  return d;
}

/** Beam pattern, Cartesian: −90…90° against 0…floor dB, steering and grating lobes marked. */
export function beamPatternSvg(draft: DesignerDraft, floorDb = -60): string {
  const pattern = designPattern(draft, 0.1);
  const sx = (deg: number) => PAD.left + ((deg + 90) / 180) * PLOT_W;
  // 0 dB at the top, floorDb at the bottom; lower levels are drawn on the floor.
  const syc = (db: number) => PAD.top + (-Math.max(floorDb, Math.min(0, db)) / -floorDb) * PLOT_H;
  const body: string[] = [];
  for (let deg = -90; deg <= 90; deg += 30) {
    body.push(
      `<line x1="${num(sx(deg))}" y1="${PAD.top}" x2="${num(sx(deg))}" y2="${PAD.top + PLOT_H}" stroke="#e5e7eb"/>`,
    );
    body.push(
      `<text x="${num(sx(deg))}" y="${PAD.top + PLOT_H + 16}" text-anchor="middle" fill="#374151">${deg}°</text>`,
    );
  }
  for (let db = 0; db >= floorDb; db -= 10) {
    body.push(
      `<line x1="${PAD.left}" y1="${num(syc(db))}" x2="${PAD.left + PLOT_W}" y2="${num(syc(db))}" stroke="#e5e7eb"/>`,
    );
    body.push(`<text x="${PAD.left - 8}" y="${num(syc(db) + 4)}" text-anchor="end" fill="#374151">${db}</text>`);
  }
  body.push(
    `<line x1="${num(sx(draft.steerDeg))}" y1="${PAD.top}" x2="${num(sx(draft.steerDeg))}" y2="${PAD.top + PLOT_H}" stroke="#0e7490" stroke-dasharray="4 3"/>`,
  );
  for (const g of pattern.gratingLobesDeg) {
    body.push(
      `<line x1="${num(sx(g))}" y1="${PAD.top}" x2="${num(sx(g))}" y2="${PAD.top + PLOT_H}" stroke="#b91c1c" stroke-dasharray="2 3"/>`,
    );
  }
  body.push(
    `<path d="${pathOf(pattern.thetaDeg, pattern.valuesDb, sx, syc)}" fill="none" stroke="#0f766e" stroke-width="1.5"/>`,
  );
  const taper = draft.taper.kind === 'chebyshev' ? `Chebyshev ${draft.taper.sidelobeDb} dB` : draft.taper.kind;
  const disabled = draft.elementStates.filter((e) => !e.enabled).length;
  const subtitle = `${draft.elements} elements, steered to ${num(draft.steerDeg)}°, ${taper} taper${disabled ? `, ${disabled} disabled` : ''}; dashed red: grating lobes`;
  return frame(`Beam pattern: ${draft.name}`, subtitle, body, 'bearing from broadside (degrees)', 'level re peak (dB)');
}

/** Separation versus aperture: Rayleigh gap and statistical limit against element count, log separation axis. */
export function separationChartSvg(draft: DesignerDraft, pairs: PairAdvice[] = pairAdvice(draft)): string {
  const chart = separationCurves(draft);
  const xs = chart.elements;
  const xMax = xs[xs.length - 1];
  const values: number[] = [];
  for (const arr of [chart.rayleighGapDeg, chart.statisticalLimitDeg])
    for (const v of arr) if (Number.isFinite(v) && v > 0) values.push(v);
  for (const p of pairs)
    if (Number.isFinite(p.chartSeparationDeg) && p.chartSeparationDeg > 0) values.push(p.chartSeparationDeg);
  const lo = Math.pow(10, Math.floor(Math.log10(Math.max(1e-4, Math.min(...values, 1)))));
  const hi = Math.pow(10, Math.ceil(Math.log10(Math.max(...values, 1))));
  const sx = (m: number) => PAD.left + ((m - 2) / Math.max(1, xMax - 2)) * PLOT_W;
  const sy = (deg: number) =>
    PAD.top + (1 - (Math.log10(deg) - Math.log10(lo)) / (Math.log10(hi) - Math.log10(lo))) * PLOT_H;
  const body: string[] = [];
  for (let decade = lo; decade <= hi * 1.0001; decade *= 10) {
    body.push(
      `<line x1="${PAD.left}" y1="${num(sy(decade))}" x2="${PAD.left + PLOT_W}" y2="${num(sy(decade))}" stroke="#e5e7eb"/>`,
    );
    body.push(
      `<text x="${PAD.left - 8}" y="${num(sy(decade) + 4)}" text-anchor="end" fill="#374151">${decade >= 1 ? decade.toFixed(0) : decade.toPrecision(1)}°</text>`,
    );
  }
  const xStep = xMax > 200 ? 64 : xMax > 80 ? 16 : 8;
  for (let m = 2; m <= xMax; m += xStep) {
    body.push(`<text x="${num(sx(m))}" y="${PAD.top + PLOT_H + 16}" text-anchor="middle" fill="#374151">${m}</text>`);
  }
  const ok = (v: number) => (v > 0 ? v : NaN);
  const gap = Array.from(chart.rayleighGapDeg, ok);
  const stat = Array.from(chart.statisticalLimitDeg, ok);
  body.push(`<path d="${pathOf(xs, gap, sx, sy)}" fill="none" stroke="#1d4ed8" stroke-width="1.5"/>`);
  body.push(
    `<path d="${pathOf(xs, stat, sx, sy)}" fill="none" stroke="#7c3aed" stroke-width="1.5" stroke-dasharray="5 3"/>`,
  );
  body.push(
    `<line x1="${num(sx(draft.elements))}" y1="${PAD.top}" x2="${num(sx(draft.elements))}" y2="${PAD.top + PLOT_H}" stroke="#0f766e" stroke-width="1.5"/>`,
  );
  body.push(
    `<text x="${num(sx(draft.elements) + 4)}" y="${PAD.top + 12}" fill="#0f766e">this array (M = ${draft.elements})</text>`,
  );
  for (const p of pairs) {
    if (!Number.isFinite(p.chartSeparationDeg) || p.chartSeparationDeg <= 0) continue;
    const colour = p.belowResolvableGap ? '#b91c1c' : '#15803d';
    const y = sy(Math.min(hi, Math.max(lo, p.chartSeparationDeg)));
    body.push(
      `<circle cx="${num(sx(draft.elements))}" cy="${num(y)}" r="4" fill="${colour}"><title>sources ${p.i + 1} and ${p.j + 1}: ${num(p.chartSeparationDeg)}°${p.belowResolvableGap ? ' (below the Rayleigh gap)' : ''}</title></circle>`,
    );
  }
  const lx = PAD.left + PLOT_W - 220;
  body.push(
    `<line x1="${lx}" y1="${PAD.top + 14}" x2="${lx + 24}" y2="${PAD.top + 14}" stroke="#1d4ed8" stroke-width="1.5"/><text x="${lx + 30}" y="${PAD.top + 18}" fill="#111827">Rayleigh gap</text>`,
  );
  body.push(
    `<line x1="${lx}" y1="${PAD.top + 30}" x2="${lx + 24}" y2="${PAD.top + 30}" stroke="#7c3aed" stroke-width="1.5" stroke-dasharray="5 3"/><text x="${lx + 30}" y="${PAD.top + 34}" fill="#111827">statistical limit (Smith)</text>`,
  );
  const subtitle = `d = ${draftSpacingWavelengths(draft).toPrecision(4)} λ, look ${num(chartLookDeg(draft))}°, ${draft.snrDb} dB SNR, ${draft.snapshots} snapshots; dots: planned pairs (red below the gap)`;
  return frame(
    `Separation versus aperture: ${draft.name}`,
    subtitle,
    body,
    'elements (M)',
    'source separation (degrees, log scale)',
  );
}
