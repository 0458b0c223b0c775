'use client';
import { COLOURS, METHOD_LABELS, VARIABLE_LABELS } from './labels';

const W = 760;
const H = 300;
const PAD = { l: 58, r: 16, t: 14, b: 40 };

export type ChartPoint = {
  value: number;
  crbRmsDeg: number;
  methods: { method: string; rmseDeg: number; resolutionProbability: number | null }[];
};

function axisX(variable: string, value: number): number {
  return variable === 'snr' ? 10 ** (value / 10) : value;
}

function niceLogTicks(lo: number, hi: number): number[] {
  const out: number[] = [];
  for (let e = Math.floor(Math.log10(lo)); e <= Math.ceil(Math.log10(hi)); e++)
    for (const m of [1, 2, 5]) {
      const v = m * 10 ** e;
      if (v >= lo * 0.999 && v <= hi * 1.001) out.push(v);
    }
  return out;
}

function fmt(v: number): string {
  if (v >= 1000 || v < 0.001) return v.toExponential(0);
  return String(Number(v.toPrecision(2)));
}

/** RMSE per method (solid, markers) and √CRB (dashed) against the swept variable, both axes logarithmic. */
export function RmseChart({
  variable,
  points,
  slopes,
}: {
  variable: string;
  points: ChartPoint[];
  slopes: { method: string; slope: number | null }[];
}) {
  const sorted = points.slice().sort((a, b) => a.value - b.value);
  const xs = sorted.map((p) => axisX(variable, p.value));
  const ys = sorted
    .flatMap((p) => [p.crbRmsDeg, ...p.methods.map((m) => m.rmseDeg)])
    .filter((v) => v > 0 && Number.isFinite(v));
  const xlo = Math.min(...xs);
  const xhi = Math.max(...xs) === xlo ? xlo * 10 : Math.max(...xs);
  const ylo = 10 ** Math.floor(Math.log10(Math.min(...ys)));
  const yhi = 10 ** Math.ceil(Math.log10(Math.max(...ys)));
  const iw = W - PAD.l - PAD.r;
  const ih = H - PAD.t - PAD.b;
  const x = (v: number) => PAD.l + ((Math.log10(v) - Math.log10(xlo)) / (Math.log10(xhi) - Math.log10(xlo) || 1)) * iw;
  const y = (v: number) =>
    PAD.t + ih - ((Math.log10(v) - Math.log10(ylo)) / (Math.log10(yhi) - Math.log10(ylo) || 1)) * ih;
  const methods = sorted[0]?.methods.map((m) => m.method) ?? [];
  const line = (vals: number[]) =>
    vals.map((v, i) => `${i ? 'L' : 'M'}${x(xs[i]).toFixed(1)},${y(Math.max(ylo, v)).toFixed(1)}`).join('');
  const slopeOf = (m: string) => slopes.find((s) => s.method === m)?.slope;
  const yTicks = niceLogTicks(ylo, yhi).filter((v) => Math.abs(Math.log10(v) - Math.round(Math.log10(v))) < 1e-9); // decades only
  return (
    <figure>
      <svg
        viewBox={`0 0 ${W} ${H}`}
        className="w-full"
        role="img"
        aria-label="RMSE and square root of the Cramér–Rao bound against the swept variable, log–log"
      >
        {yTicks.map((t) => (
          <g key={t}>
            <line x1={PAD.l} x2={W - PAD.r} y1={y(t)} y2={y(t)} className="stroke-ink-100" />
            <text x={PAD.l - 6} y={y(t) + 3} textAnchor="end" className="fill-ink-500 text-[10px]">
              {fmt(t)}°
            </text>
          </g>
        ))}
        {sorted.map((p, i) => (
          <g key={p.value}>
            <line x1={x(xs[i])} x2={x(xs[i])} y1={PAD.t} y2={PAD.t + ih} className="stroke-ink-100" />
            <text x={x(xs[i])} y={H - PAD.b + 14} textAnchor="middle" className="fill-ink-500 text-[10px]">
              {p.value}
              {variable === 'snr' ? ' dB' : ''}
            </text>
          </g>
        ))}
        <path
          d={line(sorted.map((p) => p.crbRmsDeg))}
          fill="none"
          stroke="#171717"
          strokeWidth={1.6}
          strokeDasharray="6 4"
        />
        {methods.map((m, mi) => (
          <g key={m}>
            <path
              d={line(sorted.map((p) => p.methods[mi].rmseDeg))}
              fill="none"
              stroke={COLOURS[mi % COLOURS.length]}
              strokeWidth={1.8}
            />
            {sorted.map((p, i) => (
              <circle
                key={i}
                cx={x(xs[i])}
                cy={y(Math.max(ylo, p.methods[mi].rmseDeg))}
                r={3}
                fill={COLOURS[mi % COLOURS.length]}
              >
                <title>{`${METHOD_LABELS[m] ?? m} at ${p.value}: RMSE ${p.methods[mi].rmseDeg.toPrecision(3)}°, √CRB ${p.crbRmsDeg.toPrecision(3)}°`}</title>
              </circle>
            ))}
          </g>
        ))}
        <text x={PAD.l + iw / 2} y={H - 6} textAnchor="middle" className="fill-ink-600 text-[11px]">
          {VARIABLE_LABELS[variable]?.axis ?? variable}
        </text>
        <text
          x={14}
          y={PAD.t + ih / 2}
          transform={`rotate(-90 14 ${PAD.t + ih / 2})`}
          textAnchor="middle"
          className="fill-ink-600 text-[11px]"
        >
          RMSE (degrees, log scale)
        </text>
      </svg>
      <figcaption className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-600">
        {methods.map((m, i) => (
          <span key={m} className="flex items-center gap-1.5">
            <span
              aria-hidden
              className="inline-block h-0 w-4 border-t-2"
              style={{ borderColor: COLOURS[i % COLOURS.length] }}
            />
            {METHOD_LABELS[m] ?? m}
            <span className="text-ink-400 tabular">slope {slopeOf(m) != null ? slopeOf(m)!.toFixed(2) : 'n/a'}</span>
          </span>
        ))}
        <span className="flex items-center gap-1.5">
          <span aria-hidden className="inline-block h-0 w-4 border-t-2 border-dashed border-ink-900" />
          √CRB (stochastic){' '}
          <span className="text-ink-400 tabular">
            slope {slopeOf('crb') != null ? slopeOf('crb')!.toFixed(2) : 'n/a'}
          </span>
        </span>
      </figcaption>
    </figure>
  );
}

/** Probability that every source is resolved, per method, against the swept variable (log x). */
export function ResolutionChart({ variable, points }: { variable: string; points: ChartPoint[] }) {
  const sorted = points.slice().sort((a, b) => a.value - b.value);
  const xs = sorted.map((p) => axisX(variable, p.value));
  const xlo = Math.min(...xs);
  const xhi = Math.max(...xs) === xlo ? xlo * 10 : Math.max(...xs);
  const h = 220;
  const ih = h - PAD.t - PAD.b;
  const iw = W - PAD.l - PAD.r;
  const x = (v: number) => PAD.l + ((Math.log10(v) - Math.log10(xlo)) / (Math.log10(xhi) - Math.log10(xlo) || 1)) * iw;
  const y = (p: number) => PAD.t + ih * (1 - p);
  const methods = sorted[0]?.methods.map((m) => m.method) ?? [];
  return (
    <figure>
      <svg
        viewBox={`0 0 ${W} ${h}`}
        className="w-full"
        role="img"
        aria-label="Resolution probability against the swept variable"
      >
        {[0, 0.25, 0.5, 0.75, 1].map((t) => (
          <g key={t}>
            <line x1={PAD.l} x2={W - PAD.r} y1={y(t)} y2={y(t)} className="stroke-ink-100" />
            <text x={PAD.l - 6} y={y(t) + 3} textAnchor="end" className="fill-ink-500 text-[10px]">
              {t}
            </text>
          </g>
        ))}
        {sorted.map((p, i) => (
          <text key={p.value} x={x(xs[i])} y={h - PAD.b + 14} textAnchor="middle" className="fill-ink-500 text-[10px]">
            {p.value}
            {variable === 'snr' ? ' dB' : ''}
          </text>
        ))}
        {methods.map((m, mi) => (
          <path
            key={m}
            d={sorted
              .map(
                (p, i) =>
                  `${i ? 'L' : 'M'}${x(xs[i]).toFixed(1)},${y(p.methods[mi].resolutionProbability ?? 0).toFixed(1)}`,
              )
              .join('')}
            fill="none"
            stroke={COLOURS[mi % COLOURS.length]}
            strokeWidth={1.8}
          />
        ))}
        <text x={PAD.l + iw / 2} y={h - 6} textAnchor="middle" className="fill-ink-600 text-[11px]">
          {VARIABLE_LABELS[variable]?.axis ?? variable}
        </text>
        <text
          x={14}
          y={PAD.t + ih / 2}
          transform={`rotate(-90 14 ${PAD.t + ih / 2})`}
          textAnchor="middle"
          className="fill-ink-600 text-[11px]"
        >
          P(resolved)
        </text>
      </svg>
    </figure>
  );
}
