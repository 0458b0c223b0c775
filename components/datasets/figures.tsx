/**
 * Dataset figures in plain SVG (server-rendered): per-channel power, the
 * covariance magnitude |R| as a heatmap, and the sample-covariance
 * eigenvalues with the MDL and AIC source-count choices.
 */
const W = 560;
const H = 220;
const PAD = { l: 48, r: 12, t: 12, b: 34 };

function ticks(lo: number, hi: number, count = 5): number[] {
  const span = hi - lo || 1;
  const step0 = span / count;
  const mag = 10 ** Math.floor(Math.log10(step0));
  const step = [1, 2, 5, 10].map((k) => k * mag).find((s) => s >= step0) ?? step0;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step) * step; v <= hi + 1e-9 * span; v += step) out.push(Number(v.toPrecision(12)));
  return out;
}

export function ChannelPowerChart({ powerDb }: { powerDb: number[] }) {
  const finite = powerDb.filter((v) => v > -300);
  const max = Math.max(...finite, 0);
  const median = [...finite].sort((a, b) => a - b)[Math.floor(finite.length / 2)] ?? 0;
  const lo = Math.min(...finite, median - 20) - 3;
  const hi = max + 3;
  const iw = W - PAD.l - PAD.r;
  const ih = H - PAD.t - PAD.b;
  const bw = iw / powerDb.length;
  const y = (v: number) => PAD.t + ih * (1 - (Math.max(v, lo) - lo) / (hi - lo));
  return (
    <figure>
      <svg viewBox={`0 0 ${W} ${H}`} className="w-full" role="img" aria-label="Power per channel in dB">
        {ticks(lo, hi).map((t) => (
          <g key={t}>
            <line x1={PAD.l} x2={W - PAD.r} y1={y(t)} y2={y(t)} className="stroke-ink-100" />
            <text x={PAD.l - 6} y={y(t) + 3} textAnchor="end" className="fill-ink-500 text-[10px]">
              {t}
            </text>
          </g>
        ))}
        {powerDb.map((v, i) => {
          const weak = v < median - 10;
          return (
            <g key={i}>
              <rect
                x={PAD.l + i * bw + bw * 0.15}
                width={bw * 0.7}
                y={y(v)}
                height={Math.max(0, PAD.t + ih - y(v))}
                className={weak ? 'fill-coral-500' : 'fill-glass-500'}
              >
                <title>{`Element ${i + 1}: ${v > -300 ? v.toFixed(2) + ' dB' : 'no signal'}${weak ? ' (more than 10 dB below the median)' : ''}`}</title>
              </rect>
              {powerDb.length <= 32 || i % Math.ceil(powerDb.length / 32) === 0 ? (
                <text
                  x={PAD.l + (i + 0.5) * bw}
                  y={H - PAD.b + 14}
                  textAnchor="middle"
                  className="fill-ink-500 text-[10px]"
                >
                  {i + 1}
                </text>
              ) : null}
            </g>
          );
        })}
        <line
          x1={PAD.l}
          x2={W - PAD.r}
          y1={y(median)}
          y2={y(median)}
          strokeDasharray="4 3"
          className="stroke-ink-400"
        />
        <text x={W / 2} y={H - 4} textAnchor="middle" className="fill-ink-600 text-[11px]">
          element
        </text>
        <text
          x={12}
          y={PAD.t + ih / 2}
          transform={`rotate(-90 12 ${PAD.t + ih / 2})`}
          textAnchor="middle"
          className="fill-ink-600 text-[11px]"
        >
          mean |x|² (dB)
        </text>
      </svg>
      <figcaption className="mt-1 text-xs text-ink-500">
        Dashed line: the median channel. A bar more than 10 dB below it (coral) points at a dead or badly wired channel.
      </figcaption>
    </figure>
  );
}

/** |R| normalised by its largest diagonal entry, on a perceptual-ish teal ramp. */
export function CovarianceHeatmap({ magnitude }: { magnitude: number[][] }) {
  const m = magnitude.length;
  const size = 300;
  const cell = size / m;
  let max = 0;
  for (let i = 0; i < m; i++) max = Math.max(max, magnitude[i][i]);
  const colour = (v: number) => {
    const t = Math.min(1, Math.sqrt(v / (max || 1)));
    const r = Math.round(247 - t * (247 - 15));
    const g = Math.round(250 - t * (250 - 95));
    const b = Math.round(250 - t * (250 - 100));
    return `rgb(${r},${g},${b})`;
  };
  return (
    <figure>
      <svg
        viewBox={`0 0 ${size + 40} ${size + 30}`}
        className="w-full max-w-sm"
        role="img"
        aria-label="Covariance magnitude heatmap"
      >
        <g transform="translate(30,4)">
          {magnitude.map((row, i) =>
            row.map((v, k) => (
              <rect key={`${i}-${k}`} x={k * cell} y={i * cell} width={cell + 0.3} height={cell + 0.3} fill={colour(v)}>
                <title>{`|R[${i + 1},${k + 1}]| = ${v.toPrecision(4)}`}</title>
              </rect>
            )),
          )}
          <rect x={0} y={0} width={size} height={size} fill="none" className="stroke-ink-200" />
          <text x={size / 2} y={size + 20} textAnchor="middle" className="fill-ink-600 text-[11px]">
            element k (1…{m})
          </text>
          <text
            x={-18}
            y={size / 2}
            transform={`rotate(-90 -18 ${size / 2})`}
            textAnchor="middle"
            className="fill-ink-600 text-[11px]"
          >
            element i
          </text>
        </g>
      </svg>
      <figcaption className="mt-1 text-xs text-ink-500">
        |R[i,k]| scaled by the largest diagonal entry (square-root shading). A dark row and column with a pale diagonal
        cell is a dead channel; a row brighter off the diagonal than its neighbours suggests swapped or miswired leads.
      </figcaption>
    </figure>
  );
}

export function EigenvalueChart({
  eigenvalues,
  mdl,
  aic,
  mdlChoice,
  aicChoice,
  sourceCount,
}: {
  eigenvalues: number[];
  mdl: number[];
  aic: number[];
  mdlChoice: number;
  aicChoice: number;
  sourceCount?: number;
}) {
  const p = eigenvalues.length;
  const floor = (eigenvalues[0] || 1) * 1e-14;
  const logs = eigenvalues.map((v) => Math.log10(Math.max(v, floor)));
  const lo = Math.floor(Math.min(...logs));
  const hi = Math.ceil(Math.max(...logs));
  const iw = W - PAD.l - PAD.r;
  const ih = H - PAD.t - PAD.b;
  const x = (i: number) => PAD.l + (p === 1 ? iw / 2 : (i / (p - 1)) * iw);
  const y = (v: number) => PAD.t + ih * (1 - (v - lo) / (hi - lo || 1));
  const path = logs.map((v, i) => `${i ? 'L' : 'M'}${x(i)},${y(v)}`).join(' ');
  const yTicks = ticks(lo, hi, 6).filter((t) => Number.isInteger(t));
  return (
    <figure>
      <svg
        viewBox={`0 0 ${W} ${H}`}
        className="w-full"
        role="img"
        aria-label="Eigenvalues with the MDL and AIC choices"
      >
        {yTicks.map((t) => (
          <g key={t}>
            <line x1={PAD.l} x2={W - PAD.r} y1={y(t)} y2={y(t)} className="stroke-ink-100" />
            <text x={PAD.l - 6} y={y(t) + 3} textAnchor="end" className="fill-ink-500 text-[10px]">
              1e{t}
            </text>
          </g>
        ))}
        {mdlChoice > 0 && mdlChoice < p ? (
          <line
            x1={(x(mdlChoice - 1) + x(mdlChoice)) / 2}
            x2={(x(mdlChoice - 1) + x(mdlChoice)) / 2}
            y1={PAD.t}
            y2={PAD.t + ih}
            className="stroke-glass-600"
            strokeDasharray="5 3"
          />
        ) : null}
        {aicChoice > 0 && aicChoice < p && aicChoice !== mdlChoice ? (
          <line
            x1={(x(aicChoice - 1) + x(aicChoice)) / 2}
            x2={(x(aicChoice - 1) + x(aicChoice)) / 2}
            y1={PAD.t}
            y2={PAD.t + ih}
            className="stroke-amber-500"
            strokeDasharray="2 3"
          />
        ) : null}
        <path d={path} fill="none" className="stroke-ink-500" strokeWidth={1.5} />
        {logs.map((v, i) => (
          <circle
            key={i}
            cx={x(i)}
            cy={y(v)}
            r={3.5}
            className={i < (sourceCount ?? mdlChoice) ? 'fill-glass-600' : 'fill-ink-300'}
          >
            <title>{`λ${i + 1} = ${eigenvalues[i].toPrecision(5)}; MDL(${i}) = ${mdl[i]?.toFixed(2) ?? '—'}, AIC(${i}) = ${aic[i]?.toFixed(2) ?? '—'}`}</title>
          </circle>
        ))}
        {logs.map((_, i) =>
          p <= 32 || i % Math.ceil(p / 32) === 0 ? (
            <text key={i} x={x(i)} y={H - PAD.b + 14} textAnchor="middle" className="fill-ink-500 text-[10px]">
              {i + 1}
            </text>
          ) : null,
        )}
        <text x={W / 2} y={H - 4} textAnchor="middle" className="fill-ink-600 text-[11px]">
          eigenvalue index (descending)
        </text>
      </svg>
      <figcaption className="mt-1 text-xs text-ink-500">
        Signal eigenvalues in teal. MDL picks <strong>{mdlChoice}</strong> source{mdlChoice === 1 ? '' : 's'} (dashed
        teal line), AIC picks <strong>{aicChoice}</strong>
        {aicChoice !== mdlChoice ? ' (dotted amber line)' : ''} — Wax &amp; Kailath (1985); MDL is the default rule.
        {sourceCount !== undefined && sourceCount !== mdlChoice ? ` The run used ${sourceCount}.` : ''}
      </figcaption>
    </figure>
  );
}
