'use client';

/**
 * Beam pattern in a Cartesian view (level in dB against bearing) or a polar
 * view (the front half-plane, broadside up), drawn as plain SVG with explicit
 * colours so exports look the same. The −3 dB level, the steering direction and
 * any visible grating lobes are marked. Steering and taper are set here.
 */
import { useMemo, useRef, useState } from 'react';
import type { DesignerAction, DesignerDraft } from '@/lib/designer/state';
import type { DesignFigures, PatternData } from '@/lib/designer/analysis';
import { fileSlug, patternCsv } from '@/lib/designer/export';
import { ExportMenu } from './export-menu';
import { CHART_FONT, CHART_INK } from './chart-style';
import { cn } from '@/lib/client/cn';

export interface BeamPatternChartProps {
  draft: DesignerDraft;
  pattern: PatternData;
  figures: DesignFigures;
  dispatch: (action: DesignerAction) => void;
  readOnly?: boolean;
}

const C = {
  ...CHART_INK,
  trace: '#207b6d',
  fill: 'rgba(43,153,134,0.10)',
  halfPower: '#e0780b',
  steer: '#2a3c4d',
  grating: '#c13a26',
};

const HALF_POWER_DB = -3.0103;

export function BeamPatternChart({ draft, pattern, figures, dispatch, readOnly = false }: BeamPatternChartProps) {
  const [viewKind, setViewKind] = useState<'cartesian' | 'polar'>('cartesian');
  const [floorDb, setFloorDb] = useState(-60);
  const svgRef = useRef<SVGSVGElement>(null);
  const W = 640;
  const H = viewKind === 'cartesian' ? 300 : 350;

  const cartesian = useMemo(() => {
    const L = 48,
      R = 16,
      T = 14,
      B = 36;
    const x = (t: number) => L + ((t + 90) / 180) * (W - L - R);
    const y = (db: number) => T + (Math.max(floorDb, Math.min(0, db)) / floorDb) * (300 - T - B);
    let d = '';
    for (let i = 0; i < pattern.thetaDeg.length; i++)
      d += `${i ? 'L' : 'M'}${x(pattern.thetaDeg[i]).toFixed(2)},${y(pattern.valuesDb[i]).toFixed(2)}`;
    return { x, y, d, L, R, T, B };
  }, [pattern, floorDb]);

  const polar = useMemo(() => {
    const cx = W / 2,
      cy = 320,
      R = 290;
    const r = (db: number) => (R * (Math.max(floorDb, Math.min(0, db)) - floorDb)) / -floorDb;
    const pt = (t: number, rad: number) =>
      [cx + rad * Math.sin((t * Math.PI) / 180), cy - rad * Math.cos((t * Math.PI) / 180)] as const;
    let d = '';
    for (let i = 0; i < pattern.thetaDeg.length; i++) {
      const [px, py] = pt(pattern.thetaDeg[i], r(pattern.valuesDb[i]));
      d += `${i ? 'L' : 'M'}${px.toFixed(2)},${py.toFixed(2)}`;
    }
    return { cx, cy, R, r, pt, d };
  }, [pattern, floorDb]);

  const rings: number[] = [];
  for (let db = 0; db >= floorDb; db -= 10) rings.push(db);

  const csv = () =>
    patternCsv(pattern, {
      array: draft.name,
      elements: draft.elements,
      spacing_wavelengths: figures.spacingWavelengths,
      steer_deg: draft.steerDeg,
      taper: draft.taper.kind === 'chebyshev' ? `chebyshev ${draft.taper.sidelobeDb} dB` : draft.taper.kind,
      enabled_elements: draft.elementStates.filter((e) => e.enabled).length,
      normalisation: 'dB relative to the pattern peak',
    });

  const toggle = 'rounded px-2 py-0.5 text-xs font-medium ring-1 ring-inset';

  return (
    <div className="space-y-3" data-testid="beam-pattern">
      <div className="flex flex-wrap items-end gap-x-5 gap-y-2 text-sm">
        <div className="flex items-center gap-1" role="group" aria-label="Pattern view">
          {(['cartesian', 'polar'] as const).map((k) => (
            <button
              key={k}
              type="button"
              aria-pressed={viewKind === k}
              onClick={() => setViewKind(k)}
              data-testid={`pattern-view-${k}`}
              className={cn(
                toggle,
                viewKind === k ? 'bg-ink-800 text-white ring-ink-800' : 'text-ink-600 ring-ink-200 hover:bg-ink-50',
              )}
            >
              {k === 'cartesian' ? 'Cartesian' : 'Polar'}
            </button>
          ))}
        </div>
        <label className="flex items-center gap-2">
          <span className="text-ink-600">Steer</span>
          <input
            type="range"
            min={-90}
            max={90}
            step={0.5}
            value={draft.steerDeg}
            disabled={readOnly}
            onChange={(e) => dispatch({ type: 'setSteer', steerDeg: Number(e.target.value) })}
            aria-label="Steering angle in degrees"
            data-testid="steer-slider"
            className="w-40 accent-glass-600"
          />
          <span className="w-14 tabular text-ink-800">{draft.steerDeg.toFixed(1)}°</span>
        </label>
        <label className="flex items-center gap-2">
          <span className="text-ink-600">Taper</span>
          <select
            value={draft.taper.kind}
            disabled={readOnly}
            onChange={(e) => {
              const kind = e.target.value as DesignerDraft['taper']['kind'];
              dispatch({ type: 'setTaper', taper: kind === 'chebyshev' ? { kind, sidelobeDb: 30 } : { kind } });
            }}
            data-testid="taper-select"
            className="rounded-md border border-ink-200 bg-white px-2 py-1"
          >
            <option value="uniform">Uniform</option>
            <option value="hann">Hann</option>
            <option value="hamming">Hamming</option>
            <option value="chebyshev">Dolph–Chebyshev</option>
          </select>
        </label>
        {draft.taper.kind === 'chebyshev' ? (
          <label className="flex items-center gap-2">
            <span className="text-ink-600">Sidelobes</span>
            <input
              type="number"
              min={10}
              max={120}
              step={1}
              value={draft.taper.sidelobeDb}
              disabled={readOnly}
              onChange={(e) => {
                const v = Number(e.target.value);
                if (Number.isFinite(v) && v >= 10 && v <= 120)
                  dispatch({ type: 'setTaper', taper: { kind: 'chebyshev', sidelobeDb: v } });
              }}
              className="w-16 rounded-md border border-ink-200 px-2 py-1"
              aria-label="Chebyshev sidelobe level in dB below the main lobe"
            />
            <span className="text-ink-500">dB down</span>
          </label>
        ) : null}
        <label className="flex items-center gap-2">
          <span className="text-ink-600">Floor</span>
          <select
            value={floorDb}
            onChange={(e) => setFloorDb(Number(e.target.value))}
            className="rounded-md border border-ink-200 bg-white px-2 py-1"
          >
            {[-40, -60, -80, -100].map((v) => (
              <option key={v} value={v}>
                {v} dB
              </option>
            ))}
          </select>
        </label>
        <div className="ml-auto">
          <ExportMenu
            svgRef={svgRef}
            baseName={`${fileSlug(draft.name)}-beam-pattern`}
            csv={csv}
            testIdPrefix="pattern"
          />
        </div>
      </div>

      <svg
        ref={svgRef}
        viewBox={`0 0 ${W} ${H}`}
        className="w-full"
        role="img"
        aria-label={`Beam pattern, ${viewKind} view, steered to ${draft.steerDeg.toFixed(1)} degrees`}
        fontFamily={CHART_FONT}
      >
        {viewKind === 'cartesian' ? (
          <g>
            {rings.map((db) => (
              <g key={db}>
                <line x1={cartesian.L} x2={W - cartesian.R} y1={cartesian.y(db)} y2={cartesian.y(db)} stroke={C.grid} />
                <text x={cartesian.L - 6} y={cartesian.y(db) + 3} textAnchor="end" fontSize={10} fill={C.text}>
                  {db}
                </text>
              </g>
            ))}
            {[-90, -60, -30, 0, 30, 60, 90].map((t) => (
              <g key={t}>
                <line x1={cartesian.x(t)} x2={cartesian.x(t)} y1={cartesian.T} y2={300 - cartesian.B} stroke={C.grid} />
                <text x={cartesian.x(t)} y={300 - cartesian.B + 14} textAnchor="middle" fontSize={10} fill={C.text}>
                  {t}°
                </text>
              </g>
            ))}
            <text x={W / 2} y={296} textAnchor="middle" fontSize={10} fill={C.text}>
              bearing from broadside
            </text>
            <text x={12} y={150} fontSize={10} fill={C.text} transform="rotate(-90 12 150)" textAnchor="middle">
              level, dB re peak
            </text>
            {pattern.gratingLobesDeg.map((t) => (
              <g key={`gl-${t}`} data-testid="grating-lobe-marker">
                <line
                  x1={cartesian.x(t)}
                  x2={cartesian.x(t)}
                  y1={cartesian.T}
                  y2={300 - cartesian.B}
                  stroke={C.grating}
                  strokeDasharray="2 3"
                  strokeWidth={1.5}
                />
                <text
                  x={cartesian.x(t) + (t > 0 ? -4 : 4)}
                  y={cartesian.T + 22}
                  textAnchor={t > 0 ? 'end' : 'start'}
                  fontSize={10}
                  fill={C.grating}
                >
                  grating lobe {t.toFixed(1)}°
                </text>
              </g>
            ))}
            <line
              x1={cartesian.x(draft.steerDeg)}
              x2={cartesian.x(draft.steerDeg)}
              y1={cartesian.T}
              y2={300 - cartesian.B}
              stroke={C.steer}
              strokeDasharray="5 4"
            />
            <path
              d={`${cartesian.d}L${cartesian.x(90)},${cartesian.y(floorDb)}L${cartesian.x(-90)},${cartesian.y(floorDb)}Z`}
              fill={C.fill}
              stroke="none"
            />
            <path d={cartesian.d} fill="none" stroke={C.trace} strokeWidth={1.6} strokeLinejoin="round" />
            <line
              x1={cartesian.L}
              x2={W - cartesian.R}
              y1={cartesian.y(HALF_POWER_DB)}
              y2={cartesian.y(HALF_POWER_DB)}
              stroke={C.halfPower}
              strokeDasharray="6 3"
            />
            <text
              x={W - cartesian.R - 2}
              y={cartesian.y(HALF_POWER_DB) - 4}
              textAnchor="end"
              fontSize={10}
              fill={C.halfPower}
            >
              −3 dB
            </text>
            <rect
              x={cartesian.L}
              y={cartesian.T}
              width={W - cartesian.L - cartesian.R}
              height={300 - cartesian.T - cartesian.B}
              fill="none"
              stroke={C.axis}
            />
          </g>
        ) : (
          <g>
            {rings.map((db) => {
              const rr = polar.r(db);
              return (
                <g key={db}>
                  <path
                    d={`M${polar.cx - rr},${polar.cy} A${rr},${rr} 0 0 1 ${polar.cx + rr},${polar.cy}`}
                    fill="none"
                    stroke={C.grid}
                  />
                  <text x={polar.cx + 4} y={polar.cy - rr + 11} fontSize={9} fill={C.text}>
                    {db}
                  </text>
                </g>
              );
            })}
            {[-90, -60, -30, 0, 30, 60, 90].map((t) => {
              const [px, py] = polar.pt(t, polar.R);
              const [lx, ly] = polar.pt(t, polar.R + 14);
              return (
                <g key={t}>
                  <line x1={polar.cx} y1={polar.cy} x2={px} y2={py} stroke={C.grid} />
                  <text x={lx} y={ly + 3} textAnchor="middle" fontSize={10} fill={C.text}>
                    {t}°
                  </text>
                </g>
              );
            })}
            {pattern.gratingLobesDeg.map((t) => {
              const [px, py] = polar.pt(t, polar.R);
              return (
                <line
                  key={`gl-${t}`}
                  data-testid="grating-lobe-marker"
                  x1={polar.cx}
                  y1={polar.cy}
                  x2={px}
                  y2={py}
                  stroke={C.grating}
                  strokeDasharray="2 3"
                  strokeWidth={1.5}
                />
              );
            })}
            {(() => {
              const [px, py] = polar.pt(draft.steerDeg, polar.R);
              return <line x1={polar.cx} y1={polar.cy} x2={px} y2={py} stroke={C.steer} strokeDasharray="5 4" />;
            })()}
            {(() => {
              const rr = polar.r(HALF_POWER_DB);
              return (
                <path
                  d={`M${polar.cx - rr},${polar.cy} A${rr},${rr} 0 0 1 ${polar.cx + rr},${polar.cy}`}
                  fill="none"
                  stroke={C.halfPower}
                  strokeDasharray="6 3"
                />
              );
            })()}
            <path d={`${polar.d}Z`} fill={C.fill} stroke={C.trace} strokeWidth={1.6} strokeLinejoin="round" />
            <line x1={polar.cx - polar.R} x2={polar.cx + polar.R} y1={polar.cy} y2={polar.cy} stroke={C.axis} />
            <text x={polar.cx - polar.R} y={polar.cy + 16} fontSize={10} fill={C.text}>
              array axis (element 1)
            </text>
            <text x={polar.cx + polar.R} y={polar.cy + 16} textAnchor="end" fontSize={10} fill={C.text}>
              element {draft.elements}
            </text>
          </g>
        )}
      </svg>
      <p className="text-xs text-ink-500">
        Dashed orange: −3 dB (half power). Dark dashed line: steering direction.
        {pattern.gratingLobesDeg.length ? (
          <span className="font-medium text-coral-600" data-testid="grating-lobe-note">
            {' '}
            Grating lobe{pattern.gratingLobesDeg.length > 1 ? 's' : ''} at{' '}
            {pattern.gratingLobesDeg.map((t) => `${t.toFixed(1)}°`).join(', ')}: a source there is indistinguishable
            from one at the steering direction.
          </span>
        ) : (
          ' No grating lobe in view.'
        )}
      </p>
    </div>
  );
}
