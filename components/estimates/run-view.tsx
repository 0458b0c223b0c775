'use client';
import useSWR from 'swr';
import { useMemo, useState } from 'react';
import { useRouter } from 'next/navigation';
import { fetcher } from '@/lib/client/fetcher';
import { Card, CardHeader } from '@/components/ui/card';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { FormMessage } from '@/components/ui/field';
import { ProgressBar } from '@/components/ui/progress-bar';
import { EigenvalueChart } from '@/components/datasets/figures';
import { SpectrumChart } from './spectrum-chart';
import { METHOD_LABELS } from './labels';
import { apiSendWithHeaders } from './send';
import { StopButton } from '@/components/jobs/stop-button';
import { WARNING_ADVICE } from './advice';
import { downloadText } from '@/lib/client/download';

type MethodResult = {
  method: string;
  sourceCount: number;
  sourceCountRule: string;
  bearingsDeg: number[];
  eigenvalues: number[];
  warnings: { code: string; message: string }[];
  spectrum?: { kind: string; startDeg: number; stepDeg: number; valuesDb: (number | null)[] };
  effectiveElements: number;
  criteria: { mdl: number[]; aic: number[]; snapshotsUsed: number };
  uncertainty: {
    crbStdDeg: number[];
    ci95Deg: [number, number][];
    sourcePowers: number[];
    noisePower: number;
    basis: string;
    powersRaised: boolean;
  } | null;
  uncertaintyNote?: string;
  pairs: {
    i: number;
    j: number;
    separationDeg: number;
    separationU: number;
    rayleighGapU: number;
    belowResolvableGap: boolean;
    verdict: string;
  }[];
};
export type RunDto = {
  id: number;
  status: 'queued' | 'running' | 'done' | 'failed' | 'cancelled';
  progress: number;
  error: string | null;
  softwareVersion: string;
  datasetSha256: string | null;
  createdAt: string;
  createdBy: { name: string } | null;
  inputs: {
    methods: string[];
    options: Record<string, unknown>;
    array: {
      elements: number;
      spacingWavelengths: number;
      name?: string;
      revision?: number;
      disabledElements?: number[];
    };
    dataset?: { id: number; name: string; sha256: string };
    rerunOf?: number;
    calibration?: { applied: boolean; revision?: number; note?: string };
  };
  results: MethodResult[];
};

const argmin = (v: number[]) => v.reduce((best, x, i) => (x < v[best] ? i : best), 0);

export function toCsv(run: RunDto): string {
  const lines = [
    'run,method,source,bearing_deg,crb_std_deg,ci95_low_deg,ci95_high_deg,source_count,source_count_rule,dataset_sha256,software_version',
  ];
  for (const r of run.results) {
    r.bearingsDeg.forEach((b, k) => {
      const s = r.uncertainty?.crbStdDeg[k];
      const ci = r.uncertainty?.ci95Deg[k];
      lines.push(
        [
          run.id,
          r.method,
          k + 1,
          b,
          s ?? '',
          ci?.[0] ?? '',
          ci?.[1] ?? '',
          r.sourceCount,
          r.sourceCountRule,
          run.datasetSha256 ?? '',
          run.softwareVersion,
        ].join(','),
      );
    });
  }
  return lines.join('\n') + '\n';
}

export function RunView({ id, initial, canRun }: { id: number; initial: RunDto; canRun: boolean }) {
  const router = useRouter();
  const { data, mutate } = useSWR<RunDto>(`/api/v1/estimates/${id}`, fetcher, {
    fallbackData: initial,
    // SWR's cache is empty until the first fetch (fallbackData is not cached), so fall back to the
    // server-rendered run; otherwise polling never starts when the first answer equals it.
    refreshInterval: (d) => {
      const latest = d ?? initial;
      return latest.status === 'queued' || latest.status === 'running' ? 400 : 0;
    },
  });
  const [rerun, setRerun] = useState<{ busy: boolean; error?: string }>({ busy: false });
  const run = data ?? initial;
  const active = run.status === 'queued' || run.status === 'running';
  const k = Math.max(0, ...run.results.map((r) => r.bearingsDeg.length));
  const first = run.results[0];
  const warnings = run.results.flatMap((r) => r.warnings.map((w) => ({ ...w, method: r.method })));
  const spectrumSeries = useMemo(
    () =>
      run.results.map((r) => ({
        label: METHOD_LABELS[r.method] ?? r.method,
        method: r.method,
        spectrum: r.spectrum,
        bearingsDeg: r.bearingsDeg,
        crbStdDeg: r.uncertainty?.crbStdDeg ?? null,
      })),
    [run.results],
  );
  const uniqueWarnings = Array.from(new Map(warnings.map((w) => [`${w.code}|${w.message}`, w])).values());

  return (
    <div className="grid gap-6">
      <Card aria-labelledby="status-title">
        <CardHeader
          id="status-title"
          title={
            active ? 'Running…' : run.status === 'done' ? 'Done' : run.status === 'cancelled' ? 'Stopped' : 'Failed'
          }
          description={`${run.inputs.methods.map((m) => METHOD_LABELS[m] ?? m).join(', ')} on ${run.inputs.dataset ? `“${run.inputs.dataset.name}”` : 'inline snapshots'} with ${run.inputs.array.name ? `${run.inputs.array.name} r${run.inputs.array.revision}` : 'an inline array'} (M = ${run.inputs.array.elements}, d = ${Number(run.inputs.array.spacingWavelengths.toPrecision(6))} λ). Software ${run.softwareVersion}.`}
          actions={
            run.status === 'done' ? (
              <div className="flex gap-2">
                <Button
                  variant="secondary"
                  onClick={() => downloadText(`estimate-${run.id}.csv`, 'text/csv', toCsv(run))}
                >
                  Export CSV
                </Button>
                <Button
                  variant="secondary"
                  onClick={() =>
                    downloadText(`estimate-${run.id}.json`, 'application/json', JSON.stringify(run, null, 1))
                  }
                >
                  Export JSON
                </Button>
                {canRun ? (
                  <Button
                    variant="secondary"
                    disabled={rerun.busy}
                    onClick={async () => {
                      setRerun({ busy: true });
                      try {
                        const out = await apiSendWithHeaders<{ id: number }>(
                          'POST',
                          `/api/v1/estimates/${run.id}/rerun`,
                          undefined,
                          {},
                        );
                        router.push(`/estimates/${out.id}`);
                      } catch (e) {
                        setRerun({ busy: false, error: (e as Error).message });
                      }
                    }}
                  >
                    Re-run
                  </Button>
                ) : null}
              </div>
            ) : active && canRun ? (
              <StopButton
                url={`/api/v1/estimates/${run.id}/cancel`}
                label="Stop this run"
                onStopped={() => void mutate()}
              />
            ) : null
          }
        />
        <div className="px-5 py-4">
          {active ? <ProgressBar fraction={run.progress} label="Run progress" /> : null}
          {run.error ? <FormMessage tone="error">{run.error}</FormMessage> : null}
          {rerun.error ? <FormMessage tone="error">{rerun.error}</FormMessage> : null}
          <p className="text-sm text-ink-600" data-testid="run-calibration">
            {run.inputs.calibration?.applied
              ? `Calibration of revision ${run.inputs.calibration.revision} applied: the snapshots were divided by its element gains and phases before the covariance.`
              : run.inputs.calibration?.note
                ? `No calibration applied. ${run.inputs.calibration.note}`
                : 'No calibration applied.'}
          </p>
          {run.inputs.array.disabledElements?.length ? (
            <p className="text-sm text-amber-800" data-testid="run-disabled-elements">
              Element{run.inputs.array.disabledElements.length === 1 ? '' : 's'}{' '}
              {run.inputs.array.disabledElements.join(', ')} disabled: MUSIC, Bartlett and MVDR used the enabled
              elements at their true positions, ESPRIT and root-MUSIC the longest contiguous run (see the warnings for
              what each used and its cost in the Cramér–Rao bound).
            </p>
          ) : null}
          {run.inputs.rerunOf ? (
            <p className="text-sm text-ink-600">
              A re-run of run {run.inputs.rerunOf} with the same array revision, dataset checksum and options.
            </p>
          ) : null}
          {run.datasetSha256 ? (
            <p className="mt-1 text-xs text-ink-500">
              Dataset SHA-256 <code className="font-mono">{run.datasetSha256}</code>
            </p>
          ) : null}
        </div>
      </Card>

      {run.status === 'done' && first ? (
        <>
          <Card aria-labelledby="bearings-title">
            <CardHeader
              id="bearings-title"
              title="Bearings"
              description="Degrees from broadside. ±1σ is the stochastic Cramér–Rao bound at the estimated bearings, source powers and noise; the 95% interval is ±1.96σ. The bound limits unbiased estimators and is reached only with enough snapshots and SNR."
            />
            <div className="overflow-x-auto">
              <table className="w-full text-sm" aria-label="Bearings by method">
                <thead className="bg-ink-50/70 text-left text-2xs tracking-wide text-ink-500 uppercase">
                  <tr>
                    <th className="px-4 py-2">Source</th>
                    {run.results.map((r) => (
                      <th key={r.method} className="px-4 py-2">
                        {METHOD_LABELS[r.method] ?? r.method}
                      </th>
                    ))}
                  </tr>
                </thead>
                <tbody>
                  {Array.from({ length: k }, (_, i) => (
                    <tr key={i} className="border-t border-ink-100">
                      <td className="px-4 py-2 text-ink-600">{i + 1}</td>
                      {run.results.map((r) => {
                        const b = r.bearingsDeg[i];
                        const s = r.uncertainty?.crbStdDeg[i];
                        const ci = r.uncertainty?.ci95Deg[i];
                        return (
                          <td key={r.method} className="px-4 py-2 tabular">
                            {b === undefined ? (
                              <span className="text-ink-400">—</span>
                            ) : (
                              <>
                                <span className="font-medium">{b.toFixed(3)}°</span>
                                {s !== undefined ? (
                                  <span className="text-ink-600">
                                    {' '}
                                    ± {s < 0.001 ? s.toExponential(1) : s.toFixed(3)}°
                                  </span>
                                ) : null}
                                {ci ? (
                                  <div className="text-xs text-ink-500">
                                    95%: {ci[0].toFixed(3)}° … {ci[1].toFixed(3)}°
                                  </div>
                                ) : null}
                              </>
                            )}
                          </td>
                        );
                      })}
                    </tr>
                  ))}
                  <tr className="border-t border-ink-100 text-xs text-ink-500">
                    <td className="px-4 py-2">K</td>
                    {run.results.map((r) => (
                      <td key={r.method} className="px-4 py-2">
                        {r.sourceCount} ({r.sourceCountRule}){r.uncertaintyNote ? <div>{r.uncertaintyNote}</div> : null}
                      </td>
                    ))}
                  </tr>
                  <tr className="border-t border-ink-100 text-xs text-ink-500">
                    <td className="px-4 py-2">± from</td>
                    {run.results.map((r) => (
                      <td key={r.method} className="px-4 py-2" data-testid="uncertainty-basis">
                        {r.uncertainty?.basis ?? '—'}
                      </td>
                    ))}
                  </tr>
                </tbody>
              </table>
            </div>
          </Card>

          <Card aria-labelledby="pairs-title">
            <CardHeader
              id="pairs-title"
              title="Resolvability of each estimated pair"
              description={`Below the resolvable gap when |sin θi − sin θj| < 1/(M·d) = ${(1 / (run.inputs.array.elements * run.inputs.array.spacingWavelengths)).toFixed(4)}. A beamformer merges such a pair; subspace methods may still separate it when the statistical limit (Smith 2005) allows.`}
            />
            <div className="px-5 py-4 text-sm">
              {run.results.every((r) => r.pairs.length === 0) ? (
                <p className="text-ink-500">Fewer than two sources were estimated, so there are no pairs.</p>
              ) : (
                <ul className="grid gap-1.5">
                  {run.results.flatMap((r) =>
                    r.pairs.map((p) => (
                      <li key={`${r.method}-${p.i}-${p.j}`} className="flex flex-wrap items-center gap-2">
                        <span className="w-32 text-ink-600">{METHOD_LABELS[r.method] ?? r.method}</span>
                        <span className="tabular">
                          sources {p.i + 1} & {p.j + 1}: {p.separationDeg.toFixed(3)}° apart, Δu ={' '}
                          {p.separationU.toFixed(4)}
                        </span>
                        {p.belowResolvableGap ? (
                          <Badge tone="amber">below the resolvable gap</Badge>
                        ) : (
                          <Badge tone="teal">above the gap</Badge>
                        )}
                        {p.verdict === 'unresolvable' ? <Badge tone="coral">below the statistical limit</Badge> : null}
                      </li>
                    )),
                  )}
                </ul>
              )}
            </div>
          </Card>

          <Card aria-labelledby="spectrum-title">
            <CardHeader
              id="spectrum-title"
              title="Pseudo-spectra"
              description="Spectral methods show their own spectrum; ESPRIT and root-MUSIC show the MUSIC spectrum of the same signal subspace. Ticks at the top mark each method's bearings."
            />
            <div className="px-5 py-4">
              <SpectrumChart series={spectrumSeries} exportName={`estimate-${run.id}-spectra`} />
            </div>
          </Card>

          <div className="grid gap-6 lg:grid-cols-2">
            <Card aria-labelledby="eig-title">
              <CardHeader
                id="eig-title"
                title="Eigenvalues and source count"
                description={`Of the covariance used (L = ${first.effectiveElements}, N = ${first.criteria.snapshotsUsed} for the rule).`}
              />
              <div className="px-5 py-4">
                <EigenvalueChart
                  eigenvalues={first.eigenvalues}
                  mdl={first.criteria.mdl}
                  aic={first.criteria.aic}
                  mdlChoice={argmin(first.criteria.mdl)}
                  aicChoice={argmin(first.criteria.aic)}
                  sourceCount={first.sourceCount}
                />
              </div>
            </Card>
            <Card aria-labelledby="warn-title">
              <CardHeader id="warn-title" title="Warnings" />
              <div className="px-5 py-4 text-sm">
                {uniqueWarnings.length === 0 ? (
                  <p className="text-ink-500">No warnings from the estimator.</p>
                ) : (
                  <ul className="grid gap-3">
                    {uniqueWarnings.map((w) => (
                      <li key={`${w.code}-${w.method}-${w.message}`}>
                        <div className="flex items-center gap-2">
                          <Badge tone="amber">{w.code}</Badge>
                          <span className="text-xs text-ink-500">{METHOD_LABELS[w.method] ?? w.method}</span>
                        </div>
                        <p className="mt-1 text-ink-800">{w.message}</p>
                        {WARNING_ADVICE[w.code] ? (
                          <p className="mt-0.5 text-xs text-ink-600">{WARNING_ADVICE[w.code]}</p>
                        ) : null}
                      </li>
                    ))}
                  </ul>
                )}
                <p className="mt-4 text-xs text-ink-500">
                  Estimates are advisory. A uniform line measures a cone angle and cannot tell the two sides apart;
                  model mismatch (calibration, coupling, near-field or wideband sources) breaks subspace methods.
                </p>
              </div>
            </Card>
          </div>
        </>
      ) : null}
    </div>
  );
}
