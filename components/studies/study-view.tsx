'use client';
import { useMemo, useState } from 'react';
import { useRouter } from 'next/navigation';
import type { ColumnDef } from '@tanstack/react-table';
import { Card, CardHeader } from '@/components/ui/card';
import { Button } from '@/components/ui/button';
import { DataTable } from '@/components/ui/data-table';
import { FormMessage } from '@/components/ui/field';
import { ProgressBar } from '@/components/ui/progress-bar';
import useSWR from 'swr';
import { apiSend, ClientApiError, fetcher } from '@/lib/client/fetcher';
import { StopButton } from '@/components/jobs/stop-button';
import type { StudyDto } from '@/lib/data/studies';
import { METHOD_LABELS, VARIABLE_LABELS } from './labels';
import { ResolutionChart, RmseChart } from './study-charts';
import { downloadText } from '@/lib/client/download';

type Row = {
  value: number;
  method: string;
  rmseDeg: number;
  crbRmsDeg: number;
  ratio: number;
  p50: number;
  p90: number;
  p95: number;
  resolved: number | null;
  outliers: number;
};

const num = (digits: number) => {
  const NumberCell = ({ getValue }: { getValue: () => unknown }) => {
    const v = getValue() as number | null;
    return (
      <span className="tabular">
        {v === null || v === undefined ? '—' : Number.isFinite(v) ? v.toPrecision(digits) : String(v)}
      </span>
    );
  };
  return NumberCell;
};

function rowsOf(study: StudyDto): Row[] {
  return (study.result?.points ?? []).flatMap((p) =>
    p.methods.map((m) => ({
      value: p.value,
      method: m.method,
      rmseDeg: m.rmseDeg,
      crbRmsDeg: p.crbRmsDeg,
      ratio: m.rmseOverCrb,
      p50: m.matchingDistanceDeg.p50,
      p90: m.matchingDistanceDeg.p90,
      p95: m.matchingDistanceDeg.p95,
      resolved: m.resolutionProbability,
      outliers: m.outlierRate,
    })),
  );
}

function csvOf(study: StudyDto): string {
  const head = [
    'variable',
    'value',
    'elements',
    'snapshots',
    'method',
    'rmse_deg',
    'rmse_inliers_deg',
    'crb_rms_deg',
    'rmse_over_crb',
    'matching_p50_deg',
    'matching_p90_deg',
    'matching_p95_deg',
    'resolution_probability',
    'outlier_rate',
    'crb_std_deg_per_source',
    'rmse_deg_per_source',
  ];
  const lines = [head.join(',')];
  for (const p of study.result?.points ?? []) {
    for (const m of p.methods) {
      lines.push(
        [
          study.result!.variable,
          p.value,
          p.elements,
          p.snapshots,
          m.method,
          m.rmseDeg,
          m.rmseInliersDeg ?? '',
          p.crbRmsDeg,
          m.rmseOverCrb,
          m.matchingDistanceDeg.p50,
          m.matchingDistanceDeg.p90,
          m.matchingDistanceDeg.p95,
          m.resolutionProbability ?? '',
          m.outlierRate,
          p.crbStdDeg.join(' '),
          m.rmsePerSourceDeg.join(' '),
        ].join(','),
      );
    }
  }
  return lines.join('\n') + '\n';
}

/** A study: progress while it runs (polled), then the log–log chart, resolution curve, table and exports. */
export function StudyView({ id, initial, canEdit }: { id: number; initial: StudyDto; canEdit: boolean }) {
  const router = useRouter();
  // Poll while queued or running; stop once done or failed.
  const { data, mutate } = useSWR<StudyDto>(`/api/v1/studies/${id}`, fetcher, {
    fallbackData: initial,
    // SWR's cache is empty until the first fetch (fallbackData is not cached), so fall back to the
    // server-rendered study; otherwise polling never starts when the first answer equals it.
    refreshInterval: (d) => {
      const latest = d ?? initial;
      return latest.status === 'queued' || latest.status === 'running' ? 700 : 0;
    },
  });
  const study = data ?? initial;
  const running = study.status === 'queued' || study.status === 'running';
  const [deleteError, setDeleteError] = useState<string | null>(null);
  const rows = useMemo(() => rowsOf(study), [study]);
  const spec = study.inputs.spec;
  const variable = spec.sweep.variable;
  const varLabel = VARIABLE_LABELS[variable];
  const columns: ColumnDef<Row, unknown>[] = [
    { accessorKey: 'value', header: `${varLabel.name}${varLabel.unit ? ` (${varLabel.unit})` : ''}` },
    {
      accessorKey: 'method',
      header: 'Method',
      cell: ({ getValue }) => METHOD_LABELS[String(getValue())] ?? String(getValue()),
    },
    { accessorKey: 'rmseDeg', header: 'RMSE (°)', cell: num(4) },
    { accessorKey: 'crbRmsDeg', header: '√CRB (°)', cell: num(4) },
    { accessorKey: 'ratio', header: 'RMSE / √CRB', cell: num(3) },
    { accessorKey: 'p50', header: 'Match. dist. p50 (°)', cell: num(3) },
    { accessorKey: 'p90', header: 'p90 (°)', cell: num(3) },
    { accessorKey: 'p95', header: 'p95 (°)', cell: num(3) },
    { accessorKey: 'resolved', header: 'P(resolved)', cell: num(3) },
    { accessorKey: 'outliers', header: 'Outlier rate', cell: num(3) },
  ];

  async function remove() {
    if (!window.confirm(`Delete study "${study.name}"?`)) return;
    try {
      await apiSend('DELETE', `/api/v1/studies/${id}`);
      router.push('/studies');
      router.refresh();
    } catch (err) {
      setDeleteError(err instanceof ClientApiError ? err.message : 'The study could not be deleted.');
    }
  }

  const result = study.result;
  return (
    <div className="grid gap-6">
      <Card aria-labelledby="scenario-title">
        <CardHeader
          id="scenario-title"
          title="Scenario"
          actions={
            <div className="flex gap-2">
              {result ? (
                <>
                  <Button variant="secondary" onClick={() => downloadText(`study-${id}.csv`, 'text/csv', csvOf(study))}>
                    Export CSV
                  </Button>
                  <Button
                    variant="secondary"
                    onClick={() =>
                      downloadText(
                        `study-${id}.json`,
                        'application/json',
                        JSON.stringify(
                          {
                            id,
                            name: study.name,
                            softwareVersion: study.softwareVersion,
                            inputs: study.inputs,
                            result,
                          },
                          null,
                          2,
                        ),
                      )
                    }
                  >
                    Export JSON
                  </Button>
                </>
              ) : null}
              {canEdit ? (
                <Button variant="danger" onClick={remove}>
                  Delete
                </Button>
              ) : null}
            </div>
          }
        />
        <dl className="grid gap-x-6 gap-y-2 px-5 py-4 text-sm sm:grid-cols-3">
          <div>
            <dt className="text-ink-500">Array</dt>
            <dd>
              {study.inputs.array.name ? `${study.inputs.array.name} r${study.inputs.array.revision}, ` : ''}
              {variable === 'elements' ? 'M swept' : `M = ${spec.elements}`}, d = {spec.spacingWavelengths} λ
            </dd>
          </div>
          <div>
            <dt className="text-ink-500">Sources</dt>
            <dd>
              {spec.bearingsDeg.map((b, i) => `${b}° at ${spec.powersDb[i]} dB`).join('; ')}
              {spec.correlation ? `; ρ = ${spec.correlation}` : ''}
            </dd>
          </div>
          <div>
            <dt className="text-ink-500">Sweep</dt>
            <dd>
              {varLabel.name}: {spec.sweep.values.join(', ')}
              {varLabel.unit ? ` ${varLabel.unit}` : ''}
              {variable !== 'snapshots' ? `; N = ${spec.snapshots}` : ''}
            </dd>
          </div>
          <div>
            <dt className="text-ink-500">Methods</dt>
            <dd>{spec.methods.map((m) => METHOD_LABELS[m] ?? m).join(', ')}</dd>
          </div>
          <div>
            <dt className="text-ink-500">Trials and seed</dt>
            <dd>
              {spec.trials} per point, seed {spec.seed}
            </dd>
          </div>
          <div>
            <dt className="text-ink-500">Covariance</dt>
            <dd>
              {spec.smoothing && spec.smoothing !== 'none'
                ? `smoothing ${spec.smoothing === 'auto' ? '≈ 2M/3' : `L = ${spec.smoothing}`}`
                : 'no smoothing'}
              {spec.forwardBackward ? ', forward–backward' : ''}
            </dd>
          </div>
        </dl>
        {deleteError ? (
          <div className="px-5 pb-4">
            <FormMessage tone="error">{deleteError}</FormMessage>
          </div>
        ) : null}
      </Card>

      {running ? (
        <Card aria-labelledby="progress-title">
          <CardHeader
            id="progress-title"
            title={study.status === 'queued' ? 'Queued' : 'Running'}
            description="Trials run in the background; this page follows them."
            actions={
              canEdit ? (
                <StopButton
                  url={`/api/v1/studies/${id}/cancel`}
                  label="Stop this study"
                  onStopped={() => void mutate()}
                />
              ) : null
            }
          />
          <div className="px-5 py-4">
            <ProgressBar fraction={study.progress} label="Study progress" />
            <p className="mt-2 text-sm text-ink-600 tabular">{Math.round(study.progress * 100)} %</p>
          </div>
        </Card>
      ) : null}
      {study.status === 'failed' ? <FormMessage tone="error">{study.error ?? 'The study failed.'}</FormMessage> : null}
      {study.status === 'cancelled' ? (
        <FormMessage tone="error">{study.error ?? 'The study was stopped.'}</FormMessage>
      ) : null}

      {result ? (
        <>
          <Card aria-labelledby="rmse-title">
            <CardHeader
              id="rmse-title"
              title="RMSE against the bound"
              description={`Root-mean-square error over all ${spec.trials} trials per point (outliers included) and the square root of the stochastic Cramér–Rao bound, both on log scales. Slopes are fitted on the upper half of the sweep among points with at most 1 % outliers${variable === 'elements' ? '; an efficient estimator follows about M^−1.5' : variable === 'snapshots' ? '; an efficient estimator follows N^−0.5' : '; at high SNR an efficient estimator follows SNR^−0.5'}.`}
            />
            <div className="px-5 py-4">
              <RmseChart variable={variable} points={result.points} slopes={result.slopes} />
            </div>
          </Card>
          <Card aria-labelledby="resolution-title">
            <CardHeader
              id="resolution-title"
              title="Resolution probability"
              description="Share of trials in which every estimate lies within half the gap to the nearest other source."
            />
            <div className="px-5 py-4">
              {spec.bearingsDeg.length >= 2 ? (
                <ResolutionChart variable={variable} points={result.points} />
              ) : (
                <p className="text-sm text-ink-600">
                  One source: there is no pair to resolve. Outlier rates are in the table.
                </p>
              )}
            </div>
          </Card>
          <Card aria-labelledby="numbers-title">
            <CardHeader
              id="numbers-title"
              title="Numbers"
              description={`Computed in ${(result.elapsedMs / 1000).toFixed(1)} s with software ${study.softwareVersion}. An outlier is a trial with an estimate more than half the Rayleigh gap from its source.`}
            />
            <DataTable
              data={rows}
              columns={columns}
              label="Study results"
              filterPlaceholder="Filter rows…"
              initialSort={[{ id: 'value', desc: false }]}
            />
          </Card>
        </>
      ) : null}

      <aside
        className="rounded-card border border-amber-200 bg-amber-50 px-5 py-4 text-sm text-amber-900"
        aria-label="Caution"
      >
        <p className="font-semibold">Read these numbers with care</p>
        <ul className="mt-1 list-disc space-y-1 pl-5">
          <li>
            The Cramér–Rao bound limits the variance of unbiased estimators. It promises nothing for one estimate, and a
            biased method can sit below it.
          </li>
          <li>
            Below a threshold SNR or snapshot count the errors of every method jump sharply (outliers); the bound does
            not show that.
          </li>
          <li>
            This is a simulation of the ideal model. Calibration or position errors, mutual coupling, near-field or
            wideband sources and coherent multipath break subspace methods in real data. The bound shown assumes
            uncorrelated sources.
          </li>
        </ul>
      </aside>
    </div>
  );
}
