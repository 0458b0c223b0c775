'use client';

type Spectrum = { kind: string; startDeg: number; stepDeg: number; valuesDb: (number | null)[] };
const COLOURS = ['#0f766e', '#b45309', '#7c3aed', '#be123c', '#2563eb', '#4d7c0f', '#525252'];
const W = 760;
const H = 280;
const PAD = { l: 44, r: 12, t: 12, b: 34 };
const FLOOR_DB = -50;

/**
 * Pseudo-spectra overlaid, each normalised to its own peak (0 dB) and drawn
 * from the max over 0.1° buckets so no peak is lost when thinning the 0.01° grid.
 * Estimated bearings are ticked at the top in the method's colour.
 */
export function SpectrumChart({
  series,
}: {
  series: { label: string; method: string; spectrum?: Spectrum; bearingsDeg: number[] }[];
}) {
  const own = (s: { method: string }) => s.method === 'music' || s.method === 'bartlett' || s.method === 'mvdr';
  const iw = W - PAD.l - PAD.r;
  const ih = H - PAD.t - PAD.b;
  const x = (deg: number) => PAD.l + ((deg + 90) / 180) * iw;
  const y = (db: number) => PAD.t + ih * (Math.max(FLOOR_DB, Math.min(0, db)) / FLOOR_DB);
  const paths = series.map((s) => {
    if (!s.spectrum) return null;
    const v = s.spectrum.valuesDb;
    let max = -Infinity;
    for (const d of v) if (d !== null && d > max) max = d;
    const bucket = Math.max(1, Math.round(0.1 / s.spectrum.stepDeg));
    let d = '';
    for (let i = 0; i < v.length; i += bucket) {
      let m = -Infinity;
      for (let j = i; j < Math.min(v.length, i + bucket); j++) if (v[j] !== null && v[j]! > m) m = v[j]!;
      if (m === -Infinity) m = max + FLOOR_DB;
      const deg = s.spectrum.startDeg + (i + (bucket - 1) / 2) * s.spectrum.stepDeg;
      d += `${d ? 'L' : 'M'}${x(Math.min(90, deg)).toFixed(1)},${y(m - max).toFixed(1)}`;
    }
    return d;
  });
  return (
    <figure>
      <svg viewBox={`0 0 ${W} ${H}`} className="w-full" role="img" aria-label="Pseudo-spectra">
        {[0, -10, -20, -30, -40, -50].map((t) => (
          <g key={t}>
            <line x1={PAD.l} x2={W - PAD.r} y1={y(t)} y2={y(t)} className="stroke-ink-100" />
            <text x={PAD.l - 6} y={y(t) + 3} textAnchor="end" className="fill-ink-500 text-[10px]">
              {t}
            </text>
          </g>
        ))}
        {[-90, -60, -30, 0, 30, 60, 90].map((t) => (
          <g key={t}>
            <line x1={x(t)} x2={x(t)} y1={PAD.t} y2={PAD.t + ih} className="stroke-ink-100" />
            <text x={x(t)} y={H - PAD.b + 14} textAnchor="middle" className="fill-ink-500 text-[10px]">
              {t}°
            </text>
          </g>
        ))}
        {paths.map((d, i) =>
          d ? (
            <path
              key={i}
              d={d}
              fill="none"
              stroke={COLOURS[i % COLOURS.length]}
              strokeWidth={1.4}
              strokeDasharray={own(series[i]) ? undefined : '6 4'}
            />
          ) : null,
        )}
        {series.map((s, i) =>
          s.bearingsDeg.map((b, k) => (
            <line
              key={`${i}-${k}`}
              x1={x(b)}
              x2={x(b)}
              y1={PAD.t}
              y2={PAD.t + 10 + 4 * i}
              stroke={COLOURS[i % COLOURS.length]}
              strokeWidth={2}
            >
              <title>{`${s.label}: ${b.toFixed(3)}°`}</title>
            </line>
          )),
        )}
        <text x={W / 2} y={H - 4} textAnchor="middle" className="fill-ink-600 text-[11px]">
          bearing from broadside (degrees)
        </text>
        <text
          x={12}
          y={PAD.t + ih / 2}
          transform={`rotate(-90 12 ${PAD.t + ih / 2})`}
          textAnchor="middle"
          className="fill-ink-600 text-[11px]"
        >
          dB re peak
        </text>
      </svg>
      <figcaption className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-600">
        {series.map((s, i) => (
          <span key={s.label} className="flex items-center gap-1.5">
            <span
              aria-hidden
              className="inline-block h-0 w-4 border-t-2"
              style={{ borderColor: COLOURS[i % COLOURS.length], borderTopStyle: own(s) ? 'solid' : 'dashed' }}
            />
            {s.label}
            {s.spectrum && !own(s) ? (
              <span className="text-ink-400">(dashed: the MUSIC spectrum of its signal subspace)</span>
            ) : null}
          </span>
        ))}
      </figcaption>
    </figure>
  );
}
