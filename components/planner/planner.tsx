'use client';
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import type { ColumnDef } from '@tanstack/react-table';
import { Field, FormMessage, inputClass } from '@/components/ui/field';
import { Button } from '@/components/ui/button';
import { Card, CardHeader } from '@/components/ui/card';
import { DataTable } from '@/components/ui/data-table';
import { apiSend, ClientApiError } from '@/lib/client/fetcher';
import { cn } from '@/lib/client/cn';
import type { PlanAnswer } from '@/lib/data/plans';
import type { PlanCandidate } from '@/lib/planner/plan';
import { PlanPlaneChart } from './plan-plane-chart';
import { VerifyPanel, type Verification } from './verify-panel';

/** Monte Carlo trials for a verification: as many as fit in about a third of the study budget, 100 … 400. */
const VERIFY_TRIALS = (m: number, n: number) => {
  const perTrial = 1e6 + 8 * m * n * 3 + 4 * m * m * n + 2e6 + 60 * m ** 3;
  return Math.max(20, Math.min(400, Math.floor(3e10 / perTrial)));
};

type ErrorState = { message: string; fields?: Record<string, string[]> } | null;

const value = (s: string) => {
  const t = s.trim();
  if (t === '') return undefined;
  return Number.isFinite(Number(t)) ? Number(t) : t;
};

function Select({
  id,
  label,
  value: v,
  onChange,
  options,
  hint,
  error,
}: {
  id: string;
  label: string;
  value: string;
  onChange: (v: string) => void;
  options: [string, string][];
  hint?: string;
  error?: string;
}) {
  return (
    <div>
      <label htmlFor={id} className="block text-sm font-medium text-ink-800">
        {label}
      </label>
      <select
        id={id}
        className={cn(inputClass, 'mt-1')}
        value={v}
        onChange={(e) => onChange(e.target.value)}
        aria-describedby={hint ? `${id}-hint` : undefined}
        aria-invalid={error ? true : undefined}
      >
        {options.map(([k, text]) => (
          <option key={k} value={k}>
            {text}
          </option>
        ))}
      </select>
      {hint ? (
        <p id={`${id}-hint`} className="mt-1 text-xs text-ink-500">
          {hint}
        </p>
      ) : null}
      {error ? <p className="mt-1 text-xs font-medium text-coral-600">{error}</p> : null}
    </div>
  );
}

const METHODS: [string, string][] = [
  ['esprit-tls', 'TLS-ESPRIT'],
  ['esprit-ls', 'LS-ESPRIT'],
  ['esprit-unitary', 'Unitary ESPRIT'],
  ['root-music', 'root-MUSIC'],
];

/** The planner: form → POST /api/v1/plans → chart, candidates, designer and Monte Carlo actions. */
export function Planner({ canDesign, canStudy }: { canDesign: boolean; canStudy: boolean }) {
  const router = useRouter();
  const [bandMode, setBandMode] = useState('single');
  const [frequency, setFrequency] = useState('3 kHz');
  const [low, setLow] = useState('2 kHz');
  const [high, setHigh] = useState('3 kHz');
  const [medium, setMedium] = useState('sea-water');
  const [temperature, setTemperature] = useState('10');
  const [salinity, setSalinity] = useState('35');
  const [depth, setDepth] = useState('50');
  const [speed, setSpeed] = useState('1500 m/s');
  const [sector, setSector] = useState('60');
  const [accuracy, setAccuracy] = useState('0.5');
  const [bearing, setBearing] = useState('20');
  const [resolve, setResolve] = useState('4');
  const [probability, setProbability] = useState('0.9');
  const [snr, setSnr] = useState('0');
  const [budgetMode, setBudgetMode] = useState('snapshots');
  const [snapshots, setSnapshots] = useState('2000');
  const [seconds, setSeconds] = useState('2 s');
  const [bandwidth, setBandwidth] = useState('500 Hz');
  const [method, setMethod] = useState('esprit-tls');
  const [smoothing, setSmoothing] = useState('auto');
  const [fb, setFb] = useState(false);
  const [maxElements, setMaxElements] = useState('');
  const [maxAperture, setMaxAperture] = useState('');
  const [spacing, setSpacing] = useState('');
  const [minSpacing, setMinSpacing] = useState('');
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<ErrorState>(null);
  const [plan, setPlan] = useState<PlanAnswer | null>(null);
  const [selected, setSelected] = useState<number | undefined>(undefined);
  const [actionError, setActionError] = useState<string | null>(null);
  const [acting, setActing] = useState<string | null>(null);
  const [verification, setVerification] = useState<Verification | null>(null);

  const fieldError = (...keys: string[]) => keys.map((k) => error?.fields?.[k]?.[0]).find(Boolean);

  function body(): Record<string, unknown> {
    const b: Record<string, unknown> = {
      scanSectorDeg: value(sector),
      targets: {
        accuracyDeg: value(accuracy),
        atBearingDeg: value(bearing) ?? 0,
        ...(value(resolve) !== undefined ? { resolveDeg: value(resolve) } : {}),
        ...(value(resolve) !== undefined && value(probability) !== undefined
          ? { resolutionProbability: value(probability) }
          : {}),
      },
      snrDbPerElement: value(snr),
      method,
      forwardBackward: method === 'root-music' ? false : fb,
      constraints: Object.fromEntries(
        Object.entries({
          maxElements: value(maxElements),
          maxApertureM: value(maxAperture),
          spacingM: value(spacing),
          minSpacingM: value(minSpacing),
        }).filter(([, v]) => v !== undefined),
      ),
    };
    if (method !== 'root-music') b.smoothing = smoothing;
    else b.smoothing = 'none';
    if (bandMode === 'single') b.frequencyHz = value(frequency);
    else b.band = { lowHz: value(low), highHz: value(high) };
    if (medium === 'speed') b.propagationSpeedMps = value(speed);
    else if (medium === 'radio') b.medium = { kind: 'radio' };
    else if (medium === 'sea-water')
      b.medium = {
        kind: 'sea-water',
        equation: 'mackenzie-1981',
        temperatureC: value(temperature),
        salinityPpt: value(salinity),
        depthM: value(depth),
      };
    else b.medium = { kind: medium, temperatureC: value(temperature) };
    if (budgetMode === 'snapshots') b.snapshots = value(snapshots);
    else {
      b.integrationSeconds = value(seconds);
      b.bandwidthHz = value(bandwidth);
    }
    return b;
  }

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setBusy(true);
    setError(null);
    setVerification(null);
    setActionError(null);
    try {
      const answer = await apiSend<PlanAnswer>('POST', '/api/v1/plans', body());
      setPlan(answer);
      setSelected(answer.recommendedIndex);
    } catch (err) {
      setPlan(null);
      if (err instanceof ClientApiError) setError({ message: err.message, fields: err.fields });
      else setError({ message: 'The plan could not be computed; check your connection and try again.' });
    } finally {
      setBusy(false);
    }
  }

  async function openInDesigner(c: PlanCandidate) {
    if (!plan) return;
    setActing(`design-${c.elements}`);
    setActionError(null);
    const t = plan.targets;
    try {
      const created = await apiSend<{ id: number }>('POST', '/api/v1/arrays', {
        name: `Planned ${c.elements} × ${(c.spacingM * 1000).toPrecision(3)} mm (σ ≤ ${t.accuracyDeg}° at ${t.atBearingDeg}°)`,
        elements: c.elements,
        spacing: { value: c.spacingM, unit: 'm' },
        frequencyHz: plan.gratingLobeDesign.frequencyHz,
        propagationSpeedMps: plan.propagationSpeedMps,
        scanSectorDeg: plan.scanSectorDeg,
        steerDeg: t.atBearingDeg,
        snapshots: c.snapshots,
        snrDb: plan.snrDbPerElement,
        plannedSources:
          t.resolveDeg !== undefined
            ? [
                { bearingDeg: t.atBearingDeg - t.resolveDeg / 2, snrDb: plan.snrDbPerElement },
                { bearingDeg: t.atBearingDeg + t.resolveDeg / 2, snrDb: plan.snrDbPerElement },
              ]
            : [{ bearingDeg: t.atBearingDeg, snrDb: plan.snrDbPerElement }],
      });
      router.push(`/arrays/${created.id}`);
    } catch (err) {
      setActing(null);
      setActionError(err instanceof Error ? err.message : 'The draft array could not be created.');
    }
  }

  async function verify(c: PlanCandidate, index: number) {
    if (!plan) return;
    setActing(`verify-${c.elements}`);
    setActionError(null);
    setSelected(index);
    const t = plan.targets;
    const common = {
      array: { elements: c.elements, spacingWavelengths: c.spacingWavelengthsAtEvaluation },
      snapshots: c.snapshots,
      sweep: { variable: 'snr', values: [plan.snrDbPerElement] },
      methods: [plan.method],
      trials: VERIFY_TRIALS(c.elements, c.snapshots),
      seed: 15,
      forwardBackward: plan.forwardBackward,
      smoothing: plan.smoothing,
    };
    try {
      const acc = await apiSend<{ id: number }>('POST', '/api/v1/studies', {
        ...common,
        name: `Plan check: ${c.elements} elements × ${c.snapshots} snapshots, accuracy at ${t.atBearingDeg}°`,
        sources: { bearingsDeg: [t.atBearingDeg], powersDb: [plan.snrDbPerElement] },
      });
      let resId: number | undefined;
      if (t.resolveDeg !== undefined) {
        // Two sources need a subarray of at least 3 elements: ⌈2M/3⌉ raised to 3 (none when that is all of M).
        const l = Math.max(3, Math.ceil((2 * c.elements) / 3));
        const res = await apiSend<{ id: number }>('POST', '/api/v1/studies', {
          ...common,
          smoothing: plan.smoothing === 'auto' && l < c.elements ? l : 'none',
          name: `Plan check: ${c.elements} elements × ${c.snapshots} snapshots, pair ${t.resolveDeg}° apart`,
          sources: {
            bearingsDeg: [t.atBearingDeg - t.resolveDeg / 2, t.atBearingDeg + t.resolveDeg / 2],
            powersDb: [plan.snrDbPerElement, plan.snrDbPerElement],
          },
        });
        resId = res.id;
      }
      setVerification({
        elements: c.elements,
        snapshots: c.snapshots,
        predictedStdDeg: c.predictedStdDeg,
        accuracyDeg: t.accuracyDeg,
        resolveDeg: t.resolveDeg,
        resolutionProbability: t.resolutionProbability,
        statisticalResolutionDeg: c.statisticalResolutionDeg,
        accuracyStudyId: acc.id,
        resolutionStudyId: resId,
      });
    } catch (err) {
      setActionError(err instanceof Error ? err.message : 'The verification study could not be started.');
    } finally {
      setActing(null);
    }
  }

  const p3 = (v: number | null) => (v === null ? '–' : v.toPrecision(3));
  const columns: ColumnDef<PlanCandidate & { index: number }, unknown>[] = [
    {
      accessorKey: 'elements',
      header: 'Elements',
      cell: (c) => (
        <span className="tabular">
          {c.row.original.elements}
          {c.row.original.index === plan?.recommendedIndex ? (
            <span className="ml-1.5 rounded bg-glass-100 px-1.5 py-0.5 text-2xs font-semibold text-glass-800">
              recommended
            </span>
          ) : null}
        </span>
      ),
    },
    { accessorKey: 'snapshots', header: 'Snapshots' },
    {
      id: 'actions',
      header: 'Actions',
      enableSorting: false,
      cell: (c) => {
        const cand = c.row.original;
        return (
          <div className="flex gap-1.5 whitespace-nowrap">
            {canDesign ? (
              <Button
                variant="secondary"
                onClick={() => openInDesigner(cand)}
                disabled={acting !== null}
                aria-label={`Open ${cand.elements} elements in the designer`}
              >
                {acting === `design-${cand.elements}` ? 'Opening…' : 'Open in designer'}
              </Button>
            ) : null}
            {canStudy ? (
              <Button
                variant="ghost"
                onClick={() => verify(cand, cand.index)}
                disabled={acting !== null}
                aria-label={`Verify ${cand.elements} elements by Monte Carlo`}
              >
                {acting === `verify-${cand.elements}` ? 'Starting…' : 'Verify by Monte Carlo'}
              </Button>
            ) : null}
          </div>
        );
      },
    },
    { accessorKey: 'snapshotsSetBy', header: 'N set by' },
    {
      id: 'spacing',
      accessorFn: (r) => r.spacingM * 1000,
      header: 'Spacing (mm)',
      cell: (c) => p3(c.getValue() as number),
    },
    { accessorKey: 'spacingWavelengths', header: 'd/λ (high f)', cell: (c) => p3(c.getValue() as number) },
    { accessorKey: 'apertureM', header: 'Aperture (m)', cell: (c) => p3(c.getValue() as number) },
    { accessorKey: 'predictedStdDeg', header: 'Predicted σ (°)', cell: (c) => p3(c.getValue() as number) },
    { accessorKey: 'crbStdDeg', header: '√CRB (°)', cell: (c) => p3(c.getValue() as number) },
    { accessorKey: 'efficiencyFactor', header: 'σ/√CRB', cell: (c) => p3(c.getValue() as number) },
    {
      accessorKey: 'statisticalResolutionDeg',
      header: 'Smith limit (°)',
      cell: (c) => p3(c.getValue() as number | null),
    },
    { accessorKey: 'rayleighGapDeg', header: 'Rayleigh gap (°)', cell: (c) => p3(c.getValue() as number | null) },
    { accessorKey: 'gratingLobeFreeScanDeg', header: 'GL-free scan (°)', cell: (c) => p3(c.getValue() as number) },
    {
      id: 'marginAccuracy',
      accessorFn: (r) => r.margins.accuracyDeg,
      header: 'Margin σ (°)',
      cell: (c) => p3(c.getValue() as number),
    },
    {
      id: 'marginResolution',
      accessorFn: (r) => r.margins.resolutionDeg,
      header: 'Margin res. (°)',
      cell: (c) => p3(c.getValue() as number | null),
    },
  ];

  const rec = plan ? plan.candidates[plan.recommendedIndex] : null;
  const temperatureShown = medium === 'sea-water' || medium === 'fresh-water' || medium === 'air';
  return (
    <div className="grid grid-cols-[minmax(0,1fr)] gap-6">
      <Card aria-labelledby="plan-form-title">
        <CardHeader
          id="plan-form-title"
          title="Requirements"
          description="Quantities accept units (3 kHz, 25 mm, 1.5 km/s, 250 ms); a plain number is Hz, m, m/s or s."
        />
        <form onSubmit={submit} className="grid gap-6 p-5" noValidate aria-label="Planner">
          <fieldset className="grid gap-4 sm:grid-cols-3">
            <legend className="mb-2 text-sm font-semibold text-ink-800">Band and medium</legend>
            <Select
              id="plan-band-mode"
              label="Frequency"
              value={bandMode}
              onChange={setBandMode}
              options={[
                ['single', 'One frequency'],
                ['band', 'A band (low … high)'],
              ]}
              hint="A band: grating lobes checked at the highest frequency, accuracy at the lowest"
            />
            {bandMode === 'single' ? (
              <Field
                id="plan-frequency"
                label="Analysis frequency"
                value={frequency}
                onChange={(e) => setFrequency(e.target.value)}
                error={fieldError('frequencyHz')}
              />
            ) : (
              <>
                <Field
                  id="plan-low"
                  label="Lowest frequency"
                  value={low}
                  onChange={(e) => setLow(e.target.value)}
                  error={fieldError('band.lowHz', 'band', 'frequencyHz')}
                />
                <Field
                  id="plan-high"
                  label="Highest frequency"
                  value={high}
                  onChange={(e) => setHigh(e.target.value)}
                  error={fieldError('band.highHz')}
                />
              </>
            )}
            <Select
              id="plan-medium"
              label="Medium"
              value={medium}
              onChange={setMedium}
              options={[
                ['sea-water', 'Sea water (Mackenzie 1981)'],
                ['fresh-water', 'Fresh water'],
                ['air', 'Air'],
                ['radio', 'Radio (speed of light)'],
                ['speed', 'A propagation speed I give'],
              ]}
              error={fieldError('medium', 'propagationSpeedMps')}
            />
            {temperatureShown ? (
              <Field
                id="plan-temperature"
                label="Temperature (°C)"
                inputMode="decimal"
                value={temperature}
                onChange={(e) => setTemperature(e.target.value)}
                error={fieldError('medium.temperatureC')}
              />
            ) : null}
            {medium === 'sea-water' ? (
              <>
                <Field
                  id="plan-salinity"
                  label="Salinity (ppt)"
                  inputMode="decimal"
                  value={salinity}
                  onChange={(e) => setSalinity(e.target.value)}
                  error={fieldError('medium.salinityPpt')}
                />
                <Field
                  id="plan-depth"
                  label="Depth (m)"
                  inputMode="decimal"
                  value={depth}
                  onChange={(e) => setDepth(e.target.value)}
                  error={fieldError('medium.depthM')}
                />
              </>
            ) : null}
            {medium === 'speed' ? (
              <Field
                id="plan-speed"
                label="Propagation speed"
                value={speed}
                onChange={(e) => setSpeed(e.target.value)}
                error={fieldError('propagationSpeedMps')}
              />
            ) : null}
          </fieldset>

          <fieldset className="grid gap-4 sm:grid-cols-3">
            <legend className="mb-2 text-sm font-semibold text-ink-800">Targets</legend>
            <Field
              id="plan-accuracy"
              label="Bearing accuracy σ (degrees)"
              inputMode="decimal"
              value={accuracy}
              onChange={(e) => setAccuracy(e.target.value)}
              hint="One standard deviation, one source"
              error={fieldError('targets.accuracyDeg', 'targets')}
            />
            <Field
              id="plan-bearing"
              label="At bearing (degrees from broadside)"
              inputMode="decimal"
              value={bearing}
              onChange={(e) => setBearing(e.target.value)}
              error={fieldError('targets.atBearingDeg')}
            />
            <Field
              id="plan-sector"
              label="Scan sector ± (degrees)"
              inputMode="decimal"
              value={sector}
              onChange={(e) => setSector(e.target.value)}
              hint="No grating lobe anywhere in −θ … +θ"
              error={fieldError('scanSectorDeg')}
            />
            <Field
              id="plan-resolve"
              label="Resolve two contacts (degrees apart)"
              inputMode="decimal"
              value={resolve}
              onChange={(e) => setResolve(e.target.value)}
              hint="Optional; equal powers, centred on the bearing"
              error={fieldError('targets.resolveDeg')}
            />
            <Field
              id="plan-probability"
              label="Resolution probability"
              inputMode="decimal"
              value={probability}
              onChange={(e) => setProbability(e.target.value)}
              hint="Checked by Monte Carlo only (the plan uses Smith's limit)"
              error={fieldError('targets.resolutionProbability')}
            />
            <Field
              id="plan-snr"
              label="SNR per element (dB)"
              inputMode="decimal"
              value={snr}
              onChange={(e) => setSnr(e.target.value)}
              error={fieldError('snrDbPerElement')}
            />
          </fieldset>

          <fieldset className="grid gap-4 sm:grid-cols-3">
            <legend className="mb-2 text-sm font-semibold text-ink-800">Snapshots and method</legend>
            <Select
              id="plan-budget-mode"
              label="Snapshot budget from"
              value={budgetMode}
              onChange={setBudgetMode}
              options={[
                ['snapshots', 'A snapshot count'],
                ['time', 'Integration time × bandwidth'],
              ]}
              hint="N = floor(T·B) independent snapshots"
            />
            {budgetMode === 'snapshots' ? (
              <Field
                id="plan-snapshots"
                label="At most N snapshots"
                inputMode="numeric"
                value={snapshots}
                onChange={(e) => setSnapshots(e.target.value)}
                error={fieldError('snapshots')}
              />
            ) : (
              <>
                <Field
                  id="plan-seconds"
                  label="Integration time"
                  value={seconds}
                  onChange={(e) => setSeconds(e.target.value)}
                  error={fieldError('integrationSeconds')}
                />
                <Field
                  id="plan-bandwidth"
                  label="Bandwidth"
                  value={bandwidth}
                  onChange={(e) => setBandwidth(e.target.value)}
                  error={fieldError('bandwidthHz')}
                />
              </>
            )}
            <Select
              id="plan-method"
              label="Method"
              value={method}
              onChange={setMethod}
              options={METHODS}
              error={fieldError('method')}
            />
            {method !== 'root-music' ? (
              <Select
                id="plan-smoothing"
                label="Spatial smoothing"
                value={smoothing}
                onChange={setSmoothing}
                options={[
                  ['auto', 'Subarray ⌈2M/3⌉ (recommended)'],
                  ['none', 'None (maximal overlap)'],
                ]}
                hint="Without smoothing ESPRIT loses accuracy as M grows"
                error={fieldError('smoothing')}
              />
            ) : null}
            {method !== 'root-music' ? (
              <label className="flex items-center gap-2 self-end pb-2 text-sm text-ink-800">
                <input type="checkbox" checked={fb} onChange={(e) => setFb(e.target.checked)} />
                Forward–backward averaging
              </label>
            ) : null}
          </fieldset>

          <fieldset className="grid gap-4 sm:grid-cols-4">
            <legend className="mb-2 text-sm font-semibold text-ink-800">Constraints (optional)</legend>
            <Field
              id="plan-max-elements"
              label="Most elements"
              inputMode="numeric"
              value={maxElements}
              onChange={(e) => setMaxElements(e.target.value)}
              placeholder="128"
              error={fieldError('constraints.maxElements')}
            />
            <Field
              id="plan-max-aperture"
              label="Longest aperture"
              value={maxAperture}
              onChange={(e) => setMaxAperture(e.target.value)}
              placeholder="e.g. 4 m"
              error={fieldError('constraints.maxApertureM')}
            />
            <Field
              id="plan-spacing"
              label="Fixed spacing"
              value={spacing}
              onChange={(e) => setSpacing(e.target.value)}
              placeholder="e.g. 250 mm"
              error={fieldError('constraints.spacingM')}
            />
            <Field
              id="plan-min-spacing"
              label="Smallest spacing"
              value={minSpacing}
              onChange={(e) => setMinSpacing(e.target.value)}
              placeholder="e.g. 120 mm"
              error={fieldError('constraints.minSpacingM')}
            />
          </fieldset>

          {error ? <FormMessage tone="error">{error.message}</FormMessage> : null}
          <div className="flex items-center gap-3">
            <Button type="submit" disabled={busy}>
              {busy ? 'Planning…' : 'Plan the array'}
            </Button>
            <p className="text-xs text-ink-500">Planning stores nothing.</p>
          </div>
        </form>
      </Card>

      {plan && rec ? (
        <>
          <Card aria-labelledby="plan-summary-title">
            <CardHeader
              id="plan-summary-title"
              title={`Recommended: ${rec.elements} elements at ${(rec.spacingM * 1000).toPrecision(3)} mm, ${rec.snapshots} snapshots`}
              description={`Aperture ${rec.apertureM.toPrecision(3)} m; predicted σ ${rec.predictedStdDeg.toPrecision(3)}° at ${plan.targets.atBearingDeg}°${rec.statisticalResolutionDeg !== null ? `; statistical resolution ${rec.statisticalResolutionDeg.toPrecision(3)}°` : ''}; grating-lobe free to ±${rec.gratingLobeFreeScanDeg.toPrecision(3)}° at ${plan.gratingLobeDesign.frequencyHz} Hz.`}
            />
            <div className="grid gap-3 p-5 text-sm text-ink-700">
              <ul className="list-disc space-y-1 pl-5">
                {plan.assumptions.map((a) => (
                  <li key={a}>{a}</li>
                ))}
                <li>
                  Speed {plan.propagationSpeedMps.toPrecision(6)} m/s ({plan.speedFormula}).
                </li>
              </ul>
              {plan.warnings.map((w) => (
                <FormMessage key={w} tone="warn">
                  {w}
                </FormMessage>
              ))}
            </div>
          </Card>

          <Card aria-labelledby="plan-chart-title">
            <CardHeader
              id="plan-chart-title"
              title="Elements against snapshots"
              description="Every point above both boundaries meets the targets; the candidates are the corners of that region."
            />
            <div className="p-5">
              <PlanPlaneChart plan={plan} selected={selected} />
            </div>
          </Card>

          <Card aria-labelledby="plan-candidates-title">
            <CardHeader
              id="plan-candidates-title"
              title="Candidates"
              description="The Pareto front: each needs fewer snapshots than every candidate with fewer elements. Margins ≥ 0 meet the target."
            />
            {actionError ? (
              <div className="px-5 pt-3">
                <FormMessage tone="error">{actionError}</FormMessage>
              </div>
            ) : null}
            <DataTable
              data={plan.candidates.map((c, index) => ({ ...c, index }))}
              columns={columns}
              label="Candidates"
              filterPlaceholder="Filter candidates…"
            />
            {!canDesign || !canStudy ? (
              <p className="px-5 py-3 text-xs text-ink-500">
                Engineers and admins can open a candidate in the designer and verify it by Monte Carlo.
              </p>
            ) : null}
          </Card>

          {verification ? (
            <Card aria-labelledby="plan-verify-title">
              <CardHeader id="plan-verify-title" title="Monte Carlo verification" />
              <VerifyPanel v={verification} />
            </Card>
          ) : null}
        </>
      ) : null}
    </div>
  );
}
