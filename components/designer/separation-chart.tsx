'use client';

/**
 * Separation versus aperture: the Rayleigh gap 1/(M·d) and Smith's statistical
 * resolution limit (lib/doa/bounds/resolution.ts) against aperture, on a log separation
 * axis, with the current array as a vertical marker and the planned source
 * pairs as points. Pairs below the gap are flagged here and listed with advice.
 */
import { useMemo, useRef, useState } from 'react';
import type { DesignerAction, DesignerDraft } from '@/lib/designer/state';
import type { PairAdvice } from '@/lib/designer/analysis';
import type { SeparationChart as Curves } from '@/lib/doa/bounds';
import { columnsCsv, fileSlug } from '@/lib/designer/export';
import { spreadLabels } from '@/lib/designer/label-layout';
import { ExportMenu } from './export-menu';
import { CHART_FONT, CHART_INK } from './chart-style';
import { cn } from '@/lib/client/cn';

export interface SeparationChartProps {
  draft: DesignerDraft;
  curves: Curves;
  pairs: PairAdvice[];
  spacingWavelengths: number;
  lookDeg: number;
  dispatch: (action: DesignerAction) => void;
  readOnly?: boolean;
}

const C = {
  ...CHART_INK,
  rayleigh: '#2a3c4d',
  stat: '#2b9986',
  marker: '#e0780b',
  ok: '#207b6d',
  flag: '#c13a26',
};

export function SeparationChart({
  draft,
  curves,
  pairs,
  spacingWavelengths: d,
  lookDeg,
  dispatch,
  readOnly = false,
}: SeparationChartProps) {
  const [xKind, setXKind] = useState<'elements' | 'length'>('elements');
  const [yKind, setYKind] = useState<'deg' | 'u'>('deg');
  const svgRef = useRef<SVGSVGElement>(null);
  const W = 640,
    H = 320,
    L = 56,
    R = 16,
    T = 14,
    B = 40;

  const chart = useMemo(() => {
    const xs = xKind === 'elements' ? Array.from(curves.elements) : Array.from(curves.apertureWavelengths);
    const gap = yKind === 'deg' ? Array.from(curves.rayleighGapDeg) : Array.from(curves.rayleighGapU);
    const stat = yKind === 'deg' ? Array.from(curves.statisticalLimitDeg) : Array.from(curves.statisticalLimitU);
    const currentX = xKind === 'elements' ? draft.elements : (draft.elements - 1) * d;
    const pts = pairs
      .map((p) => ({ p, y: yKind === 'deg' ? p.chartSeparationDeg : p.separationU }))
      .filter((q) => Number.isFinite(q.y) && q.y > 0);
    const ys = [...gap, ...stat, ...pts.map((q) => q.y)].filter((v) => Number.isFinite(v) && v > 0);
    const lo = Math.floor(Math.log10(Math.min(...ys, yKind === 'deg' ? 0.1 : 0.001)));
    const hi = Math.ceil(Math.log10(Math.max(...ys, yKind === 'deg' ? 10 : 0.1)));
    const xMin = Math.min(...xs);
    const xMax = Math.max(...xs);
    const x = (v: number) => L + ((v - xMin) / (xMax - xMin || 1)) * (W - L - R);
    const y = (v: number) => T + ((hi - Math.log10(v)) / (hi - lo || 1)) * (H - T - B);
    const path = (vals: number[]) => {
      let s = '';
      let pen = false;
      vals.forEach((v, i) => {
        if (!Number.isFinite(v) || v <= 0) {
          pen = false;
          return;
        }
        s += `${pen ? 'L' : 'M'}${x(xs[i]).toFixed(2)},${y(v).toFixed(2)}`;
        pen = true;
      });
      return s;
    };
    const xTicks: number[] = [];
    const span = xMax - xMin;
    const stepX = [1, 2, 5, 10, 20, 50, 100, 200].find((s) => span / s <= 8) ?? 500;
    for (let v = Math.ceil(xMin / stepX) * stepX; v <= xMax + 1e-9; v += stepX) xTicks.push(v);
    const yTicks: number[] = [];
    for (let e = lo; e <= hi; e++) yTicks.push(Math.pow(10, e));
    // pair labels of close pairs would overlap: nudge them apart vertically (12 units for 10-unit text),
    // below the "this array" label at the top and inside the plot
    const labelYs = spreadLabels(
      pts.map((q) => y(q.y)),
      { minGap: 12, top: T + 22, bottom: H - B - 4 },
    );
    return { xs, gap, stat, x, y, gapPath: path(gap), statPath: path(stat), currentX, pts, labelYs, xTicks, yTicks };
  }, [curves, pairs, xKind, yKind, draft.elements, d]);

  const flagged = pairs.filter((p) => p.belowResolvableGap);
  const toggle = 'rounded px-2 py-0.5 text-xs font-medium ring-1 ring-inset';
  const yLabel =
    yKind === 'deg'
      ? `separation, degrees (pair centred on ${lookDeg.toFixed(1)}°)`
      : 'separation Δu = |sin θ₁ − sin θ₂|';
  const xLabel = xKind === 'elements' ? 'aperture, elements M' : 'aperture, (M − 1)·d in λ';

  const csv = () =>
    columnsCsv({
      elements: curves.elements,
      aperture_wavelengths: curves.apertureWavelengths,
      rayleigh_gap_u: curves.rayleighGapU,
      rayleigh_gap_deg_at_look: curves.rayleighGapDeg,
      statistical_limit_u: curves.statisticalLimitU,
      statistical_limit_deg_at_look: curves.statisticalLimitDeg,
    });

  const numberInput = 'w-24 rounded-md border border-ink-200 px-2 py-1 text-sm';

  return (
    <div className="space-y-3" data-testid="separation-chart">
      <div className="flex flex-wrap items-end gap-x-5 gap-y-2 text-sm">
        <div className="flex items-center gap-1" role="group" aria-label="Horizontal axis">
          {(['elements', 'length'] as const).map((k) => (
            <button
              key={k}
              type="button"
              aria-pressed={xKind === k}
              onClick={() => setXKind(k)}
              data-testid={`sep-x-${k}`}
              className={cn(
                toggle,
                xKind === k ? 'bg-ink-800 text-white ring-ink-800' : 'text-ink-600 ring-ink-200 hover:bg-ink-50',
              )}
            >
              {k === 'elements' ? 'Elements' : 'Length in λ'}
            </button>
          ))}
        </div>
        <div className="flex items-center gap-1" role="group" aria-label="Vertical axis">
          {(['deg', 'u'] as const).map((k) => (
            <button
              key={k}
              type="button"
              aria-pressed={yKind === k}
              onClick={() => setYKind(k)}
              data-testid={`sep-y-${k}`}
              className={cn(
                toggle,
                yKind === k ? 'bg-ink-800 text-white ring-ink-800' : 'text-ink-600 ring-ink-200 hover:bg-ink-50',
              )}
            >
              {k === 'deg' ? 'Degrees' : 'Δu'}
            </button>
          ))}
        </div>
        <label className="flex items-center gap-2">
          <span className="text-ink-600">SNR per element</span>
          <input
            type="number"
            step={1}
            className={numberInput}
            value={draft.snrDb}
            disabled={readOnly}
            data-testid="sep-snr"
            aria-label="SNR per element in dB"
            onChange={(e) => e.target.value !== '' && dispatch({ type: 'setSnr', snrDb: Number(e.target.value) })}
          />
          <span className="text-ink-500">dB</span>
        </label>
        <label className="flex items-center gap-2">
          <span className="text-ink-600">Snapshots</span>
          <input
            type="number"
            step={1}
            min={1}
            className={numberInput}
            value={draft.snapshots}
            disabled={readOnly}
            data-testid="sep-snapshots"
            aria-label="Number of snapshots"
            onChange={(e) => dispatch({ type: 'setSnapshots', snapshots: Number(e.target.value) })}
          />
        </label>
        <div className="ml-auto">
          <ExportMenu
            svgRef={svgRef}
            baseName={`${fileSlug(draft.name)}-separation`}
            csv={csv}
            testIdPrefix="separation"
          />
        </div>
      </div>

      <svg
        ref={svgRef}
        viewBox={`0 0 ${W} ${H}`}
        className="w-full"
        role="img"
        aria-label="Resolvable separation against aperture"
        fontFamily={CHART_FONT}
      >
        {chart.yTicks.map((v) => (
          <g key={v}>
            <line x1={L} x2={W - R} y1={chart.y(v)} y2={chart.y(v)} stroke={C.grid} />
            <text x={L - 6} y={chart.y(v) + 3} textAnchor="end" fontSize={10} fill={C.text}>
              {v >= 1 ? v.toFixed(0) : v.toPrecision(1)}
            </text>
          </g>
        ))}
        {chart.xTicks.map((v) => (
          <g key={v}>
            <line x1={chart.x(v)} x2={chart.x(v)} y1={T} y2={H - B} stroke={C.grid} />
            <text x={chart.x(v)} y={H - B + 14} textAnchor="middle" fontSize={10} fill={C.text}>
              {Number.isInteger(v) ? v : v.toFixed(1)}
            </text>
          </g>
        ))}
        <text x={(L + W - R) / 2} y={H - 6} textAnchor="middle" fontSize={10} fill={C.text}>
          {xLabel}
        </text>
        <text
          x={12}
          y={(T + H - B) / 2}
          textAnchor="middle"
          fontSize={10}
          fill={C.text}
          transform={`rotate(-90 12 ${(T + H - B) / 2})`}
        >
          {yLabel}
        </text>
        <rect x={L} y={T} width={W - L - R} height={H - T - B} fill="none" stroke={C.axis} />
        <path d={chart.gapPath} fill="none" stroke={C.rayleigh} strokeWidth={1.8} />
        <path d={chart.statPath} fill="none" stroke={C.stat} strokeWidth={1.8} strokeDasharray="6 3" />
        <line
          x1={chart.x(chart.currentX)}
          x2={chart.x(chart.currentX)}
          y1={T}
          y2={H - B}
          stroke={C.marker}
          strokeWidth={1.5}
          data-testid="sep-current-marker"
        />
        <text x={chart.x(chart.currentX) + 4} y={T + 12} fontSize={10} fill={C.marker}>
          this array
        </text>
        {chart.pts.map(({ p, y }, k) => (
          <g
            key={`${p.i}-${p.j}`}
            data-testid="sep-pair-point"
            data-below-gap={p.belowResolvableGap ? 'true' : 'false'}
          >
            <circle
              cx={chart.x(chart.currentX)}
              cy={chart.y(y)}
              r={p.belowResolvableGap ? 6 : 4.5}
              fill={p.belowResolvableGap ? '#ffffff' : C.ok}
              stroke={p.belowResolvableGap ? C.flag : C.ok}
              strokeWidth={2}
            />
            {Math.abs(chart.labelYs[k] - chart.y(y)) > 1 ? (
              <line
                x1={chart.x(chart.currentX) + 6}
                y1={chart.y(y)}
                x2={chart.x(chart.currentX) + 8}
                y2={chart.labelYs[k]}
                stroke={p.belowResolvableGap ? C.flag : C.ok}
                strokeWidth={1}
              />
            ) : null}
            <text
              x={chart.x(chart.currentX) + 9}
              y={chart.labelYs[k] + 3}
              fontSize={10}
              fill={p.belowResolvableGap ? C.flag : C.ok}
            >
              S{p.i + 1}–S{p.j + 1}
              {p.belowResolvableGap ? ' below gap' : ''}
            </text>
          </g>
        ))}
        <g transform={`translate(${W - R - 190}, ${H - B - 44})`}>
          <rect width={184} height={38} fill="#ffffff" stroke={C.grid} />
          <line x1={8} x2={30} y1={12} y2={12} stroke={C.rayleigh} strokeWidth={1.8} />
          <text x={36} y={15} fontSize={10} fill={C.text}>
            Rayleigh gap 1/(M·d)
          </text>
          <line x1={8} x2={30} y1={28} y2={28} stroke={C.stat} strokeWidth={1.8} strokeDasharray="6 3" />
          <text x={36} y={31} fontSize={10} fill={C.text}>
            statistical limit ({draft.snrDb} dB, N = {draft.snapshots})
          </text>
        </g>
      </svg>
      <p className="text-xs text-ink-500">
        Below the solid line a beamformer merges two sources into one peak. Below the dashed line (Smith 2005: the
        separation equals its own Cramér–Rao standard deviation) no unbiased method can be expected to separate them at
        this SNR and snapshot count. Both assume the full uniform array of {draft.elements} elements at {d.toFixed(4)}{' '}
        λ; the chart ignores disabled elements and the taper.
      </p>

      <div>
        <h3 className="text-sm font-semibold">Planned source pairs</h3>
        {pairs.length === 0 ? (
          <p className="mt-1 text-sm text-ink-500">
            Add two or more source arrows on the canvas to check whether they can be told apart.
          </p>
        ) : (
          <ul className="mt-2 space-y-2" data-testid="pair-list">
            {pairs.map((p) => (
              <li
                key={`${p.i}-${p.j}`}
                data-testid="pair-item"
                data-pair={`${p.i}-${p.j}`}
                data-verdict={p.verdict}
                data-below-gap={p.belowResolvableGap ? 'true' : 'false'}
                data-separation-u={String(p.separationU)}
                className={cn(
                  'rounded-md border px-3 py-2 text-sm',
                  p.verdict === 'resolvable'
                    ? 'border-glass-200 bg-glass-50 text-glass-800'
                    : p.verdict === 'needs-high-resolution'
                      ? 'border-amber-300 bg-amber-50 text-amber-700'
                      : 'border-coral-500/40 bg-coral-50 text-coral-700',
                )}
              >
                <p>
                  <strong className="font-semibold">
                    {p.verdict === 'resolvable'
                      ? 'Resolvable.'
                      : p.verdict === 'needs-high-resolution'
                        ? 'Below the Rayleigh gap.'
                        : p.verdict === 'coincident'
                          ? 'Same direction.'
                          : 'Below the resolvable gap and the statistical limit.'}
                  </strong>{' '}
                  {p.outcome}
                </p>
                {p.fixes.length ? (
                  <ul className="mt-1 list-disc pl-5 text-xs">
                    {p.fixes.map((f) => (
                      <li key={f}>{f}</li>
                    ))}
                  </ul>
                ) : null}
              </li>
            ))}
          </ul>
        )}
        {flagged.length ? (
          <p role="status" className="mt-2 text-xs text-ink-600" data-testid="pair-flag-count">
            {flagged.length} of {pairs.length} pair{pairs.length === 1 ? '' : 's'} below the resolvable gap.
          </p>
        ) : null}
      </div>
    </div>
  );
}
