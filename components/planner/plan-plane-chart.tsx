'use client';
/**
 * The elements–snapshots plane as a plain SVG (one component, so it can be swapped for another
 * chart library): contours of the predicted σ (N = (σ1(M)/σ)²), the resolution boundary, the
 * N ≥ M line, the snapshot budget, the region meeting every target, and the candidates.
 */

export type PlanePlan = {
  plane: { elements: number[]; sigmaAtOneSnapshotDeg: number[]; resolutionSnapshots: number[] | null };
  candidates: { elements: number; snapshots: number; predictedStdDeg: number }[];
  recommendedIndex: number;
  snapshotBudget: number;
  targets: { accuracyDeg: number; resolveDeg?: number };
};

const W = 760;
const H = 340;
const PAD = { l: 62, r: 20, t: 14, b: 42 };
const CONTOUR = ['#0f766e', '#0f766e', '#0f766e', '#0f766e'];

const fmt = (v: number) => String(Number(v.toPrecision(2)));

export function PlanPlaneChart({ plan, selected }: { plan: PlanePlan; selected?: number }) {
  const { plane, candidates, targets } = plan;
  const ms = plane.elements;
  if (ms.length === 0) return null;
  const xlo = ms[0];
  const xhi = Math.max(ms[ms.length - 1], xlo + 1);
  const maxCandN = Math.max(...candidates.map((c) => c.snapshots));
  const yhi =
    10 ** Math.max(2, Math.ceil(Math.log10(Math.max(maxCandN * 4, Math.min(plan.snapshotBudget, maxCandN * 30)))));
  const ylo = 1;
  const iw = W - PAD.l - PAD.r;
  const ih = H - PAD.t - PAD.b;
  const x = (m: number) => PAD.l + ((m - xlo) / (xhi - xlo)) * iw;
  const y = (n: number) =>
    PAD.t +
    ih -
    ((Math.log10(Math.min(yhi, Math.max(ylo, n))) - Math.log10(ylo)) / (Math.log10(yhi) - Math.log10(ylo))) * ih;
  const path = (ns: number[]) => ms.map((m, i) => `${i ? 'L' : 'M'}${x(m).toFixed(1)},${y(ns[i]).toFixed(1)}`).join('');
  const levels = [0.5, 1, 2, 4].map((k) => k * targets.accuracyDeg);
  const nFor = (level: number) => plane.sigmaAtOneSnapshotDeg.map((s) => (s / level) ** 2);
  const needed = ms.map((m, i) =>
    Math.max(nFor(targets.accuracyDeg)[i], plane.resolutionSnapshots ? plane.resolutionSnapshots[i] : 1, m),
  );
  const feasible = `${path(needed)}L${x(ms[ms.length - 1]).toFixed(1)},${PAD.t}L${x(ms[0]).toFixed(1)},${PAD.t}Z`;
  const decades: number[] = [];
  for (let e = 0; 10 ** e <= yhi; e++) decades.push(10 ** e);
  const step = Math.max(1, Math.ceil((xhi - xlo) / 12));
  const xTicks: number[] = [];
  for (let m = xlo; m <= xhi; m += step) xTicks.push(m);
  const budgetShown = plan.snapshotBudget <= yhi;
  const desc = `Candidates: ${candidates.map((c) => `${c.elements} elements with ${c.snapshots} snapshots`).join('; ')}.`;
  return (
    <figure>
      <svg
        viewBox={`0 0 ${W} ${H}`}
        className="w-full max-w-4xl"
        role="img"
        aria-labelledby="plane-title plane-desc"
        data-testid="plan-plane-chart"
      >
        <title id="plane-title">
          Elements against snapshots: contours of predicted σ, the resolution boundary and the candidates
        </title>
        <desc id="plane-desc">{desc}</desc>
        <path d={feasible} fill="#ccfbf1" opacity={0.55} />
        {decades.map((t) => (
          <g key={t}>
            <line x1={PAD.l} x2={W - PAD.r} y1={y(t)} y2={y(t)} className="stroke-ink-100" />
            <text x={PAD.l - 6} y={y(t) + 3} textAnchor="end" className="fill-ink-500 text-[10px]">
              {t.toLocaleString('en-GB').replace(/,/g, '\u2009')}
            </text>
          </g>
        ))}
        {xTicks.map((m) => (
          <g key={m}>
            <line x1={x(m)} x2={x(m)} y1={PAD.t} y2={PAD.t + ih} className="stroke-ink-100" />
            <text x={x(m)} y={H - PAD.b + 14} textAnchor="middle" className="fill-ink-500 text-[10px]">
              {m}
            </text>
          </g>
        ))}
        {levels.map((level, i) => {
          const ns = nFor(level);
          const labelAt = Math.min(ms.length - 1, Math.floor(ms.length * 0.8));
          const ly = y(ns[labelAt]);
          return (
            <g key={level}>
              <path
                d={path(ns)}
                fill="none"
                stroke={CONTOUR[i]}
                strokeWidth={level === targets.accuracyDeg ? 2.2 : 1}
                opacity={level === targets.accuracyDeg ? 1 : 0.55}
              />
              {ly > PAD.t + 8 && ly < PAD.t + ih - 4 ? (
                <text x={x(ms[labelAt]) + 4} y={ly - 4} className="fill-glass-800 text-[10px]">
                  σ {fmt(level)}°
                </text>
              ) : null}
            </g>
          );
        })}
        {plane.resolutionSnapshots ? (
          <path
            d={path(plane.resolutionSnapshots)}
            fill="none"
            stroke="#be123c"
            strokeWidth={1.8}
            strokeDasharray="7 4"
          />
        ) : null}
        <path d={path(ms)} fill="none" stroke="#737373" strokeWidth={1} strokeDasharray="2 3" />
        {budgetShown ? (
          <g>
            <line
              x1={PAD.l}
              x2={W - PAD.r}
              y1={y(plan.snapshotBudget)}
              y2={y(plan.snapshotBudget)}
              stroke="#b45309"
              strokeWidth={1.2}
            />
            <text
              x={W - PAD.r - 4}
              y={y(plan.snapshotBudget) - 4}
              textAnchor="end"
              className="fill-amber-700 text-[10px]"
            >
              budget {plan.snapshotBudget}
            </text>
          </g>
        ) : null}
        {candidates.map((c, i) => {
          const rec = i === plan.recommendedIndex;
          const sel = i === selected;
          return (
            <g key={c.elements}>
              {rec || sel ? (
                <circle cx={x(c.elements)} cy={y(c.snapshots)} r={8} fill="none" stroke="#171717" strokeWidth={1.5} />
              ) : null}
              <circle cx={x(c.elements)} cy={y(c.snapshots)} r={4} fill="#171717">
                <title>{`${c.elements} elements, ${c.snapshots} snapshots: σ ${c.predictedStdDeg.toPrecision(3)}°${rec ? ' (recommended)' : ''}`}</title>
              </circle>
            </g>
          );
        })}
        <text x={PAD.l + iw / 2} y={H - 6} textAnchor="middle" className="fill-ink-600 text-[11px]">
          elements M
        </text>
        <text
          x={14}
          y={PAD.t + ih / 2}
          transform={`rotate(-90 14 ${PAD.t + ih / 2})`}
          textAnchor="middle"
          className="fill-ink-600 text-[11px]"
        >
          snapshots N (log scale)
        </text>
      </svg>
      <figcaption className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-600">
        <span className="flex items-center gap-1.5">
          <span aria-hidden className="inline-block h-0 w-4 border-t-2 border-glass-700" />σ contours (target bold; ½×,
          2×, 4×)
        </span>
        {plane.resolutionSnapshots ? (
          <span className="flex items-center gap-1.5">
            <span aria-hidden className="inline-block h-0 w-4 border-t-2 border-dashed border-coral-600" />
            resolution boundary ({fmt(targets.resolveDeg ?? 0)}°, Smith 2005)
          </span>
        ) : null}
        <span className="flex items-center gap-1.5">
          <span aria-hidden className="inline-block h-0 w-4 border-t border-dotted border-ink-500" />N = M
        </span>
        <span className="flex items-center gap-1.5">
          <span aria-hidden className="inline-block h-3 w-4" style={{ background: '#ccfbf1' }} />
          meets every target
        </span>
        <span className="flex items-center gap-1.5">
          <span aria-hidden className="inline-block h-2 w-2 rounded-full bg-ink-900" />
          candidates (ringed: recommended)
        </span>
      </figcaption>
    </figure>
  );
}
