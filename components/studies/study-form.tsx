'use client';
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { Field, FormMessage, inputClass } from '@/components/ui/field';
import { Button } from '@/components/ui/button';
import { apiSend, ClientApiError } from '@/lib/client/fetcher';
import { cn } from '@/lib/client/cn';
import { METHOD_LABELS, VARIABLE_LABELS } from './labels';

export type ArrayChoice = {
  id: number;
  name: string;
  revision: number;
  elements: number;
  spacingWavelengths: number;
  disabledElements: number[];
};

const numbers = (text: string) =>
  text
    .split(/[,\s]+/)
    .filter(Boolean)
    .map(Number);

/** Scenario, sweep, methods and trials; submits POST /api/v1/studies and opens the study. */
export function StudyForm({ arrays }: { arrays: ArrayChoice[] }) {
  const router = useRouter();
  const usable = arrays.filter((a) => a.disabledElements.length === 0);
  const [name, setName] = useState('');
  const [arraySource, setArraySource] = useState<string>('inline');
  const [elements, setElements] = useState('10');
  const [spacing, setSpacing] = useState('0.5');
  const [bearings, setBearings] = useState('0');
  const [powers, setPowers] = useState('0');
  const [correlation, setCorrelation] = useState('0');
  const [snapshots, setSnapshots] = useState('100');
  const [variable, setVariable] = useState('snr');
  const [values, setValues] = useState('-10, -5, 0, 5, 10, 20');
  const [methods, setMethods] = useState<string[]>(['root-music', 'esprit-tls']);
  const [trials, setTrials] = useState('200');
  const [seed, setSeed] = useState('1');
  const [fb, setFb] = useState(false);
  const [smoothing, setSmoothing] = useState('none');
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<{ message: string; fields?: Record<string, string[]> } | null>(null);

  const sweepsElements = variable === 'elements';
  const fieldError = (...keys: string[]) => keys.map((k) => error?.fields?.[k]?.[0]).find(Boolean);

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setBusy(true);
    setError(null);
    const body: Record<string, unknown> = {
      name: name.trim() || 'Untitled study',
      sources: { bearingsDeg: numbers(bearings), powersDb: numbers(powers), correlation: Number(correlation) },
      snapshots: Number(snapshots),
      sweep: { variable, values: numbers(values) },
      methods,
      trials: Number(trials),
      seed: Number(seed),
      forwardBackward: fb,
      smoothing: smoothing === 'none' || smoothing === 'auto' ? smoothing : Number(smoothing),
    };
    // When M is swept the sweep values set it; the stored base M is the smallest of them.
    const baseElements =
      sweepsElements && numbers(values).some(Number.isFinite)
        ? Math.min(...numbers(values).filter(Number.isFinite))
        : Number(elements);
    if (arraySource === 'inline') body.array = { elements: baseElements, spacingWavelengths: Number(spacing) };
    else body.arrayId = Number(arraySource);
    try {
      const created = await apiSend<{ id: number }>('POST', '/api/v1/studies', body);
      router.push(`/studies/${created.id}`);
    } catch (err) {
      setBusy(false);
      if (err instanceof ClientApiError) setError({ message: err.message, fields: err.fields });
      else setError({ message: 'The study could not be started; check your connection and try again.' });
    }
  }

  const unit = variable === 'snr' ? 'dB' : variable === 'snapshots' ? 'snapshots' : 'elements';
  return (
    <form onSubmit={submit} className="grid gap-6 p-5" noValidate>
      <Field
        id="study-name"
        label="Name"
        value={name}
        onChange={(e) => setName(e.target.value)}
        placeholder="e.g. Harbour line: root-MUSIC vs SNR"
        error={fieldError('name')}
      />

      <fieldset className="grid gap-4 sm:grid-cols-3">
        <legend className="mb-2 text-sm font-semibold text-ink-800">Array</legend>
        <div>
          <label htmlFor="study-array" className="block text-sm font-medium text-ink-800">
            Geometry
          </label>
          <select
            id="study-array"
            className={cn(inputClass, 'mt-1')}
            value={arraySource}
            onChange={(e) => setArraySource(e.target.value)}
            aria-describedby={fieldError('arrayId') ? 'study-array-error' : undefined}
          >
            <option value="inline">Elements and spacing (below)</option>
            {usable.map((a) => (
              <option key={a.id} value={String(a.id)}>
                {a.name} r{a.revision} ({a.elements} × {a.spacingWavelengths.toPrecision(3)} λ)
              </option>
            ))}
          </select>
          {arraySource !== 'inline' && sweepsElements ? (
            <p className="mt-1 text-xs text-ink-500">The sweep values set M; this array&apos;s spacing is kept.</p>
          ) : null}
          {fieldError('arrayId') ? (
            <p id="study-array-error" className="mt-1 text-xs font-medium text-coral-600">
              {fieldError('arrayId')}
            </p>
          ) : null}
        </div>
        {arraySource === 'inline' ? (
          <>
            {sweepsElements ? (
              <Field
                id="study-elements"
                label="Elements M"
                value=""
                placeholder="from the sweep"
                disabled
                hint="Set by the sweep values below"
                error={fieldError('array', 'array.elements')}
              />
            ) : (
              <Field
                id="study-elements"
                label="Elements M"
                inputMode="numeric"
                value={elements}
                onChange={(e) => setElements(e.target.value)}
                error={fieldError('array', 'array.elements')}
              />
            )}
            <Field
              id="study-spacing"
              label="Spacing d (wavelengths)"
              inputMode="decimal"
              value={spacing}
              onChange={(e) => setSpacing(e.target.value)}
              error={fieldError('array.spacingWavelengths')}
            />
          </>
        ) : null}
      </fieldset>

      <fieldset className="grid gap-4 sm:grid-cols-3">
        <legend className="mb-2 text-sm font-semibold text-ink-800">Sources (noise power 1 per element)</legend>
        <Field
          id="study-bearings"
          label="Bearings (degrees)"
          value={bearings}
          onChange={(e) => setBearings(e.target.value)}
          hint="Comma-separated, from broadside"
          error={fieldError('sources', 'sources.bearingsDeg', 'bearingsDeg')}
        />
        <Field
          id="study-powers"
          label="Powers (dB, per-element SNR)"
          value={powers}
          onChange={(e) => setPowers(e.target.value)}
          hint="One per bearing"
          error={fieldError('sources.powersDb')}
        />
        <Field
          id="study-correlation"
          label="Correlation ρ (0–1)"
          inputMode="decimal"
          value={correlation}
          onChange={(e) => setCorrelation(e.target.value)}
          error={fieldError('sources.correlation')}
        />
      </fieldset>

      <fieldset className="grid gap-4 sm:grid-cols-3">
        <legend className="mb-2 text-sm font-semibold text-ink-800">Sweep</legend>
        <div>
          <label htmlFor="study-variable" className="block text-sm font-medium text-ink-800">
            Swept variable
          </label>
          <select
            id="study-variable"
            className={cn(inputClass, 'mt-1')}
            value={variable}
            onChange={(e) => setVariable(e.target.value)}
          >
            {Object.entries(VARIABLE_LABELS).map(([k, v]) => (
              <option key={k} value={k}>
                {v.name}
              </option>
            ))}
          </select>
        </div>
        <Field
          id="study-values"
          label={`Values (${unit})`}
          value={values}
          onChange={(e) => setValues(e.target.value)}
          hint={
            variable === 'snr'
              ? 'SNR of the first source; the others keep their offsets'
              : 'Comma-separated whole numbers'
          }
          error={fieldError('sweep', 'sweep.values')}
        />
        {variable !== 'snapshots' ? (
          <Field
            id="study-snapshots"
            label="Snapshots N"
            inputMode="numeric"
            value={snapshots}
            onChange={(e) => setSnapshots(e.target.value)}
            error={fieldError('snapshots')}
          />
        ) : (
          <div />
        )}
      </fieldset>

      <fieldset>
        <legend className="mb-2 text-sm font-semibold text-ink-800">Methods</legend>
        <div className="flex flex-wrap gap-x-5 gap-y-2">
          {Object.entries(METHOD_LABELS).map(([k, label]) => (
            <label key={k} className="flex items-center gap-2 text-sm">
              <input
                type="checkbox"
                checked={methods.includes(k)}
                onChange={(e) => setMethods((m) => (e.target.checked ? [...m, k] : m.filter((x) => x !== k)))}
              />
              {label}
            </label>
          ))}
        </div>
        {fieldError('methods') ? (
          <p className="mt-1 text-xs font-medium text-coral-600">{fieldError('methods')}</p>
        ) : null}
        <p className="mt-1 text-xs text-ink-500">
          The source count is known to every method. MUSIC, Bartlett and MVDR search the 0.01° grid and cost the most.
        </p>
      </fieldset>

      <fieldset className="grid gap-4 sm:grid-cols-4">
        <legend className="mb-2 text-sm font-semibold text-ink-800">Trials and covariance</legend>
        <Field
          id="study-trials"
          label="Trials per point"
          inputMode="numeric"
          value={trials}
          onChange={(e) => setTrials(e.target.value)}
          error={fieldError('trials')}
        />
        <Field
          id="study-seed"
          label="Seed"
          inputMode="numeric"
          value={seed}
          onChange={(e) => setSeed(e.target.value)}
          error={fieldError('seed')}
        />
        <div>
          <label htmlFor="study-smoothing" className="block text-sm font-medium text-ink-800">
            Spatial smoothing
          </label>
          <select
            id="study-smoothing"
            className={cn(inputClass, 'mt-1')}
            value={['none', 'auto'].includes(smoothing) ? smoothing : 'size'}
            onChange={(e) => setSmoothing(e.target.value === 'size' ? '6' : e.target.value)}
          >
            <option value="none">None</option>
            <option value="auto">Auto (≈ 2M/3)</option>
            <option value="size">Subarray size…</option>
          </select>
          {!['none', 'auto'].includes(smoothing) ? (
            <input
              aria-label="Smoothing subarray size"
              className={cn(inputClass, 'mt-2')}
              value={smoothing}
              onChange={(e) => setSmoothing(e.target.value)}
            />
          ) : null}
          {fieldError('smoothing') ? (
            <p className="mt-1 text-xs font-medium text-coral-600">{fieldError('smoothing')}</p>
          ) : null}
        </div>
        <label className="flex items-center gap-2 self-end pb-2 text-sm">
          <input type="checkbox" checked={fb} onChange={(e) => setFb(e.target.checked)} /> Forward–backward averaging
        </label>
      </fieldset>

      {error ? <FormMessage tone="error">{error.message}</FormMessage> : null}
      <div>
        <Button type="submit" disabled={busy}>
          {busy ? 'Starting…' : 'Start study'}
        </Button>
      </div>
    </form>
  );
}
