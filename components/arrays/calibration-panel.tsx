'use client';
import { useMemo, useState } from 'react';
import { useRouter } from 'next/navigation';
import useSWR, { mutate } from 'swr';
import { Card, CardHeader } from '@/components/ui/card';
import { Button } from '@/components/ui/button';
import { Badge } from '@/components/ui/badge';
import { FormMessage, inputClass } from '@/components/ui/field';
import { ProgressBar } from '@/components/ui/progress-bar';
import { Chart } from '@/components/charts/chart';
import { apiSend, ClientApiError, fetcher } from '@/lib/client/fetcher';
import { cn } from '@/lib/client/cn';
import { calibrationBarsOption } from '@/lib/charts/calibration';
import type { ArrayDetailDto } from '@/lib/data/arrays';
import type { CalibrationDto } from '@/lib/data/calibrations';
import type { DatasetListItem } from '@/lib/data/datasets';

/**
 * The calibration panel of the array page: choose one or more reference datasets with
 * their known bearings, run the fit on the job queue (202, polled with progress), see
 * per-element gain and phase bars with ±1σ error bars, the residual and the verdict,
 * and accept the result as a new revision (POST …/accept; the page then shows it).
 */

type RefRow = { datasetId: string; bearings: string };

const METHOD_OPTIONS = [
  { value: 'known-bearings', label: 'Known bearings (default)' },
  { value: 'self-calibration', label: 'Self-calibration (bearings as starting values)' },
];

const VERDICT_TONE = { supported: 'teal', weak: 'amber', 'poor-fit': 'amber', inconsistent: 'coral' } as const;

function parseBearings(text: string): number[] | null {
  const parts = text
    .split(/[,\s;]+/)
    .map((s) => s.trim())
    .filter(Boolean);
  if (!parts.length) return null;
  const out = parts.map(Number);
  return out.every(Number.isFinite) ? out : null;
}

export function CalibrationPanel({
  arrayId,
  elements,
  currentStates,
  canEdit,
  readOnlyReason,
}: {
  arrayId: number;
  elements: number;
  /** The shown revision's gain/phase per element (drawn beside the estimates). */
  currentStates: { gainDb: number; phaseDeg: number }[] | null;
  canEdit: boolean;
  readOnlyReason?: string;
}) {
  const router = useRouter();
  const { data: datasets } = useSWR<{ items: DatasetListItem[] }>('/api/v1/datasets', fetcher);
  const usable = (datasets?.items ?? []).filter((d) => d.elements === elements);
  const [rows, setRows] = useState<RefRow[]>([{ datasetId: '', bearings: '' }]);
  const [method, setMethod] = useState('known-bearings');
  const [frequency, setFrequency] = useState('');
  const [error, setError] = useState<{ message: string; fields?: Record<string, string[]> } | null>(null);
  const [runningId, setRunningId] = useState<number | null>(null);
  const [busy, setBusy] = useState(false);
  const [accepted, setAccepted] = useState<number | null>(null);

  const key = runningId ? `/api/v1/arrays/${arrayId}/calibrations/${runningId}` : null;
  const { data: calibration } = useSWR<CalibrationDto>(key, fetcher, {
    refreshInterval: (c) => (c && (c.status === 'queued' || c.status === 'running') ? 500 : 0),
  });

  async function run() {
    setError(null);
    setAccepted(null);
    const references: { datasetId: number; bearingsDeg: number[] }[] = [];
    for (let i = 0; i < rows.length; i++) {
      const r = rows[i];
      const bearingsDeg = parseBearings(r.bearings);
      if (!r.datasetId) return setError({ message: `Reference ${i + 1}: choose a dataset.` });
      if (!bearingsDeg)
        return setError({ message: `Reference ${i + 1}: give the known bearings in degrees, separated by commas.` });
      references.push({ datasetId: Number(r.datasetId), bearingsDeg });
    }
    const body: Record<string, unknown> = { references, method, accept: false };
    if (frequency.trim()) body.frequencyHz = Number(frequency);
    setBusy(true);
    try {
      const queued = await apiSend<CalibrationDto>('POST', `/api/v1/arrays/${arrayId}/calibrations`, body, {
        prefer: 'respond-async',
      });
      setRunningId(queued.id);
    } catch (err) {
      setError(
        err instanceof ClientApiError
          ? { message: err.message, fields: err.fields }
          : { message: 'The calibration could not be started.' },
      );
    } finally {
      setBusy(false);
    }
  }

  async function accept() {
    if (!calibration) return;
    setBusy(true);
    setError(null);
    try {
      const res = await apiSend<{ revision: ArrayDetailDto }>(
        'POST',
        `/api/v1/arrays/${arrayId}/calibrations/${calibration.id}/accept`,
      );
      setAccepted(res.revision.revision);
      // The workspace's copy of the latest revision, then the server page (the designer reopens on it).
      await mutate(`/api/v1/arrays/${arrayId}`, res.revision, { revalidate: false });
      router.refresh();
    } catch (err) {
      setError({ message: err instanceof ClientApiError ? err.message : 'The calibration could not be accepted.' });
    } finally {
      setBusy(false);
    }
  }

  const active = calibration && (calibration.status === 'queued' || calibration.status === 'running');
  const report = calibration?.status === 'done' ? calibration.report : null;

  return (
    <Card aria-labelledby="calibration-title" data-testid="calibration-panel">
      <CardHeader
        id="calibration-title"
        title="Calibration"
        description="Fit each element's gain and phase (relative to element 1) from reference recordings of sources at known bearings. Several references at different positions average out the multipath of each."
      />
      <div className="space-y-4 px-5 py-4">
        {!canEdit ? (
          <p role="note" data-testid="calibration-read-only" className="text-sm text-ink-600">
            {readOnlyReason ?? 'Your role may not calibrate arrays.'} Calibrations create a new revision, so only
            engineers and admins run them.
          </p>
        ) : (
          <>
            <div className="space-y-2" data-testid="calibration-references">
              {rows.map((r, i) => (
                <div key={i} className="flex flex-wrap items-end gap-3">
                  <label className="text-sm font-medium text-ink-800">
                    Reference {i + 1}
                    <select
                      className={cn(inputClass, 'mt-1 w-72')}
                      value={r.datasetId}
                      data-testid={`calibration-dataset-${i}`}
                      onChange={(e) => setRows(rows.map((x, j) => (j === i ? { ...x, datasetId: e.target.value } : x)))}
                    >
                      <option value="">Choose a dataset with {elements} channels…</option>
                      {usable.map((d) => (
                        <option key={d.id} value={d.id}>
                          {d.name} ({d.format}, {d.snapshots} snapshots)
                        </option>
                      ))}
                    </select>
                  </label>
                  <label className="text-sm font-medium text-ink-800">
                    Known bearings (°)
                    <input
                      className={cn(inputClass, 'mt-1 w-44')}
                      value={r.bearings}
                      placeholder="e.g. 20 or -30, 15"
                      data-testid={`calibration-bearings-${i}`}
                      onChange={(e) => setRows(rows.map((x, j) => (j === i ? { ...x, bearings: e.target.value } : x)))}
                    />
                  </label>
                  {rows.length > 1 ? (
                    <Button variant="ghost" onClick={() => setRows(rows.filter((_, j) => j !== i))}>
                      Remove
                    </Button>
                  ) : null}
                </div>
              ))}
              <Button
                variant="secondary"
                data-testid="calibration-add-reference"
                onClick={() => setRows([...rows, { datasetId: '', bearings: '' }])}
              >
                Add reference
              </Button>
            </div>
            <div className="flex flex-wrap items-end gap-3">
              <label className="text-sm font-medium text-ink-800">
                Method
                <select
                  className={cn(inputClass, 'mt-1 w-80')}
                  value={method}
                  data-testid="calibration-method"
                  onChange={(e) => setMethod(e.target.value)}
                >
                  {METHOD_OPTIONS.map((o) => (
                    <option key={o.value} value={o.value}>
                      {o.label}
                    </option>
                  ))}
                </select>
              </label>
              <label className="text-sm font-medium text-ink-800">
                WAV analysis frequency (Hz, optional)
                <input
                  className={cn(inputClass, 'mt-1 w-40')}
                  value={frequency}
                  inputMode="decimal"
                  onChange={(e) => setFrequency(e.target.value)}
                />
              </label>
              <Button onClick={run} disabled={busy || Boolean(active)} data-testid="calibration-run">
                Run calibration
              </Button>
            </div>
          </>
        )}
        {error ? (
          <FormMessage tone="error">
            {error.message}
            {error.fields ? ` (${Object.keys(error.fields).join(', ')})` : ''}
          </FormMessage>
        ) : null}
        {active ? (
          <div data-testid="calibration-progress">
            <ProgressBar fraction={calibration.progress} label="Calibration progress" />
            <p className="mt-1 text-sm text-ink-600 tabular">
              {calibration.status === 'queued' ? 'Queued' : 'Fitting'} · {Math.round(calibration.progress * 100)} %
            </p>
          </div>
        ) : null}
        {calibration?.status === 'failed' ? (
          <FormMessage tone="error">{calibration.error ?? 'The calibration failed.'}</FormMessage>
        ) : null}
        {report && calibration ? (
          <CalibrationResultView
            calibration={calibration}
            currentStates={currentStates}
            canAccept={canEdit && calibration.acceptedRevision === null && accepted === null}
            onAccept={accept}
            busy={busy}
            accepted={accepted ?? calibration.acceptedRevision}
          />
        ) : null}
      </div>
    </Card>
  );
}

function CalibrationResultView({
  calibration,
  currentStates,
  canAccept,
  onAccept,
  busy,
  accepted,
}: {
  calibration: CalibrationDto;
  currentStates: { gainDb: number; phaseDeg: number }[] | null;
  canAccept: boolean;
  onAccept: () => void;
  busy: boolean;
  accepted: number | null;
}) {
  const report = calibration.report!;
  const gain = useMemo(
    () =>
      calibrationBarsOption({
        quantity: 'gain',
        values: report.elements.map((e) => e.gainDb),
        stds: report.elements.map((e) => e.gainStdDb),
        ...(currentStates ? { current: currentStates.map((s) => s.gainDb) } : {}),
      }),
    [report, currentStates],
  );
  const phase = useMemo(
    () =>
      calibrationBarsOption({
        quantity: 'phase',
        values: report.elements.map((e) => e.phaseDeg),
        stds: report.elements.map((e) => e.phaseStdDeg),
        ...(currentStates ? { current: currentStates.map((s) => s.phaseDeg) } : {}),
      }),
    [report, currentStates],
  );
  const v = report.verdict;
  return (
    <div className="space-y-4" data-testid="calibration-result" data-verdict={v.status}>
      <div className="flex flex-wrap items-center gap-2 text-sm">
        <Badge tone={VERDICT_TONE[v.status]}>{v.status}</Badge>
        <span className="text-ink-700">{report.methodLabel}</span>
      </div>
      <ul className="list-disc space-y-1 pl-5 text-sm text-ink-700" data-testid="calibration-verdict">
        {v.messages.map((m, i) => (
          <li key={i}>{m}</li>
        ))}
      </ul>
      <p className="text-sm text-ink-700 tabular" data-testid="calibration-residual">
        Residual (share of the steering vectors outside the signal subspace): {(100 * report.residual).toPrecision(3)} %
        after, {(100 * report.residualUncalibrated).toPrecision(3)} % before calibration.
      </p>
      <div className="grid gap-4 lg:grid-cols-2">
        <figure data-testid="calibration-gain-chart">
          <Chart
            option={gain}
            height={260}
            ariaLabel="Estimated gain per element with ±1σ error bars"
            exportName={`calibration-${calibration.id}-gain`}
            testIdPrefix="calibration-gain"
          />
          <figcaption className="mt-1 text-xs text-ink-500">Gain re element 1 (dB), ±1σ (jackknife).</figcaption>
        </figure>
        <figure data-testid="calibration-phase-chart">
          <Chart
            option={phase}
            height={260}
            ariaLabel="Estimated phase per element with ±1σ error bars"
            exportName={`calibration-${calibration.id}-phase`}
            testIdPrefix="calibration-phase"
          />
          <figcaption className="mt-1 text-xs text-ink-500">Phase re element 1 (degrees), ±1σ (jackknife).</figcaption>
        </figure>
      </div>
      {report.references.length > 1 ? (
        <table className="w-full text-sm" data-testid="calibration-references-table">
          <thead className="text-left text-ink-500">
            <tr>
              <th className="py-1 font-medium">Reference</th>
              <th className="py-1 font-medium">Bearings</th>
              <th className="py-1 font-medium">Leave-one-out χ²/dof</th>
              <th className="py-1 font-medium">RMS difference</th>
              <th className="py-1 font-medium" />
            </tr>
          </thead>
          <tbody>
            {report.references.map((r) => (
              <tr key={r.index} className="border-t border-ink-100 tabular">
                <td className="py-1">
                  {r.index + 1}. {calibration.inputs.references[r.index]?.name}
                </td>
                <td className="py-1">{r.bearingsDeg.map((b) => `${b}°`).join(', ')}</td>
                <td className="py-1">{r.consistency?.chiSquarePerDof.toPrecision(3)}</td>
                <td className="py-1">
                  {r.consistency?.rmsGainDiffDb.toFixed(2)} dB, {r.consistency?.rmsPhaseDiffDeg.toFixed(1)}°
                </td>
                <td className="py-1">
                  {v.flaggedReference === r.index ? (
                    <Badge tone="coral">disagrees</Badge>
                  ) : r.consistency?.disagrees ? (
                    <Badge tone="amber">differs</Badge>
                  ) : null}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      ) : null}
      <p className="text-xs text-ink-500">
        Estimates are advisory: the ± are from the recordings&apos; own noise; multipath, coupling and wrong bearings
        are checked only as far as the references allow.
      </p>
      {accepted !== null ? (
        <FormMessage tone="ok">Accepted as revision {accepted}; the designer now shows it.</FormMessage>
      ) : canAccept ? (
        <Button onClick={onAccept} disabled={busy} data-testid="calibration-accept">
          Accept as a new revision
        </Button>
      ) : null}
    </div>
  );
}
