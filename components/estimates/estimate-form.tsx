'use client';
import { useMemo, useState } from 'react';
import { useRouter } from 'next/navigation';
import { Button } from '@/components/ui/button';
import { FormMessage, inputClass } from '@/components/ui/field';
import { apiSendWithHeaders } from './send';
import { METHOD_LABELS } from './labels';
import { cn } from '@/lib/client/cn';

export type ArrayOption = {
  id: number;
  name: string;
  revision: number;
  elements: number;
  spacingWavelengths: number;
  disabledElements: number[];
};
export type DatasetOption = { id: number; name: string; elements: number; snapshots: number; format: string };

const METHODS = Object.keys(METHOD_LABELS);

type Refusal = { message: string; fields?: Record<string, string[]> };

/** Picks data, geometry, methods and covariance options; submits an asynchronous run and opens it. */
export function EstimateForm({
  arrays,
  datasets,
  initialDatasetId,
}: {
  arrays: ArrayOption[];
  datasets: DatasetOption[];
  initialDatasetId?: number;
}) {
  const router = useRouter();
  const [datasetId, setDatasetId] = useState<number | ''>(initialDatasetId ?? datasets[0]?.id ?? '');
  const dataset = datasets.find((d) => d.id === datasetId);
  const [geometry, setGeometry] = useState<'array' | 'inline'>(arrays.length ? 'array' : 'inline');
  const matching = useMemo(() => arrays.filter((a) => !dataset || a.elements === dataset.elements), [arrays, dataset]);
  // A choice is one saved revision ("arrayId:revision"); the first matching one (newest revision of the first array) by default.
  const [arrayKey, setArrayKey] = useState('');
  const keyOf = (a: ArrayOption) => `${a.id}:${a.revision}`;
  const chosenArray =
    matching.find((a) => keyOf(a) === arrayKey) ?? matching.find((a) => !a.disabledElements.length) ?? matching[0];
  const [spacing, setSpacing] = useState('0.5');
  const [methods, setMethods] = useState<string[]>(['esprit-ls', 'music']);
  const [countMode, setCountMode] = useState<'mdl' | 'aic' | 'given'>('mdl');
  const [sourceCount, setSourceCount] = useState('2');
  const [fb, setFb] = useState(false);
  const [smoothing, setSmoothing] = useState('');
  const [single, setSingle] = useState(false);
  const [singleL, setSingleL] = useState('');
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<Refusal | null>(null);

  const elements = dataset?.elements ?? 0;
  const mismatch = geometry === 'array' && chosenArray && dataset && chosenArray.elements !== dataset.elements;

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setError(null);
    if (!dataset) return setError({ message: 'Choose a dataset first (upload one on the Datasets page).' });
    if (!methods.length)
      return setError({ message: 'Choose at least one method.', fields: { methods: ['choose at least one method'] } });
    const body: Record<string, unknown> = { datasetId: dataset.id, methods, includeSpectrum: true };
    if (geometry === 'array') {
      if (!chosenArray)
        return setError({ message: `No array of your team has ${elements} elements; enter the spacing instead.` });
      body.arrayId = chosenArray.id;
      body.arrayRevision = chosenArray.revision;
    } else body.array = { elements, spacingWavelengths: Number(spacing) };
    if (countMode === 'given') body.sourceCount = Number(sourceCount);
    else body.sourceCountRule = countMode;
    if (fb) body.forwardBackward = true;
    if (smoothing) body.smoothingSubarray = Number(smoothing);
    if (single) {
      body.singleSnapshot = true;
      if (singleL) body.singleSnapshotSubarray = Number(singleL);
    }
    setBusy(true);
    try {
      const run = await apiSendWithHeaders<{ id: number }>('POST', '/api/v1/estimates', body, {
        prefer: 'respond-async',
      });
      router.push(`/estimates/${run.id}`);
    } catch (err) {
      const e2 = err as Error & { fields?: Record<string, string[]> };
      setError({ message: e2.message, fields: e2.fields });
      setBusy(false);
    }
  }

  const fieldError = (name: string) => error?.fields?.[name]?.[0];
  return (
    <form onSubmit={submit} className="grid gap-5 px-5 py-4" aria-label="New estimate" noValidate>
      <div className="grid gap-4 md:grid-cols-2">
        <div>
          <label htmlFor="datasetId" className="block text-sm font-medium text-ink-800">
            Dataset
          </label>
          <select
            id="datasetId"
            className={cn(inputClass, 'mt-1')}
            value={datasetId}
            onChange={(e) => setDatasetId(e.target.value ? Number(e.target.value) : '')}
          >
            {datasets.length === 0 ? <option value="">No datasets yet</option> : null}
            {datasets.map((d) => (
              <option key={d.id} value={d.id}>
                {d.name} ({d.snapshots} × {d.elements}, {d.format.toUpperCase()})
              </option>
            ))}
          </select>
        </div>
        <fieldset>
          <legend className="block text-sm font-medium text-ink-800">Array geometry</legend>
          <div className="mt-1 flex gap-4 text-sm">
            <label className="flex items-center gap-1.5">
              <input
                type="radio"
                name="geometry"
                checked={geometry === 'array'}
                onChange={() => setGeometry('array')}
                disabled={!arrays.length}
              />{' '}
              A saved array
            </label>
            <label className="flex items-center gap-1.5">
              <input
                type="radio"
                name="geometry"
                checked={geometry === 'inline'}
                onChange={() => setGeometry('inline')}
              />{' '}
              Spacing only
            </label>
          </div>
          {geometry === 'array' ? (
            <select
              aria-label="Array"
              id="arrayId"
              className={cn(inputClass, 'mt-2')}
              value={chosenArray ? keyOf(chosenArray) : ''}
              onChange={(e) => setArrayKey(e.target.value)}
              aria-invalid={mismatch || fieldError('arrayId') ? true : undefined}
              aria-describedby="arrayId-note"
            >
              {matching.length === 0 ? <option value="">No array with {elements} elements</option> : null}
              {(dataset ? matching : arrays).map((a) => (
                <option key={keyOf(a)} value={keyOf(a)}>
                  {a.name} r{a.revision} — {a.elements} elements, d = {Number(a.spacingWavelengths.toPrecision(4))} λ
                  {a.disabledElements.length ? ' (has disabled elements)' : ''}
                </option>
              ))}
            </select>
          ) : (
            <div className="mt-2 flex items-center gap-2 text-sm">
              <span className="tabular">M = {elements || '—'}</span>
              <label htmlFor="spacing" className="ml-3">
                d (wavelengths)
              </label>
              <input
                id="spacing"
                type="number"
                step="any"
                min="0"
                className={cn(inputClass, 'w-28')}
                value={spacing}
                onChange={(e) => setSpacing(e.target.value)}
              />
            </div>
          )}
          <p
            id="arrayId-note"
            className={cn(
              'mt-1 text-xs',
              mismatch || fieldError('arrayId') || fieldError('array') ? 'text-coral-700' : 'text-ink-500',
            )}
          >
            {fieldError('arrayId') ??
              fieldError('array') ??
              (mismatch
                ? `The array has ${chosenArray!.elements} elements but the dataset has ${elements} columns.`
                : 'Only arrays whose element count equals the dataset’s columns are listed; each saved revision is a choice, and the run keeps the one you pick.')}
          </p>
        </fieldset>
      </div>

      <fieldset>
        <legend className="text-sm font-medium text-ink-800">Methods</legend>
        <div className="mt-1 flex flex-wrap gap-x-5 gap-y-2 text-sm">
          {METHODS.map((m) => (
            <label key={m} className="flex items-center gap-1.5">
              <input
                type="checkbox"
                checked={methods.includes(m)}
                onChange={(e) => setMethods((cur) => (e.target.checked ? [...cur, m] : cur.filter((x) => x !== m)))}
              />
              {METHOD_LABELS[m]}
            </label>
          ))}
        </div>
      </fieldset>

      <div className="grid gap-4 md:grid-cols-2">
        <fieldset>
          <legend className="text-sm font-medium text-ink-800">Source count</legend>
          <div className="mt-1 flex flex-wrap items-center gap-4 text-sm">
            <label className="flex items-center gap-1.5">
              <input type="radio" name="count" checked={countMode === 'mdl'} onChange={() => setCountMode('mdl')} /> MDL
              (default)
            </label>
            <label className="flex items-center gap-1.5">
              <input type="radio" name="count" checked={countMode === 'aic'} onChange={() => setCountMode('aic')} /> AIC
            </label>
            <label className="flex items-center gap-1.5">
              <input type="radio" name="count" checked={countMode === 'given'} onChange={() => setCountMode('given')} />{' '}
              Known:
            </label>
            <input
              aria-label="Known source count"
              type="number"
              min={0}
              className={cn(inputClass, 'w-20')}
              value={sourceCount}
              disabled={countMode !== 'given'}
              onChange={(e) => setSourceCount(e.target.value)}
              aria-invalid={fieldError('sourceCount') ? true : undefined}
              aria-describedby={fieldError('sourceCount') ? 'sourceCount-error' : undefined}
            />
          </div>
          {fieldError('sourceCount') ? (
            <p id="sourceCount-error" className="mt-1 text-xs font-medium text-coral-600">
              {fieldError('sourceCount')}
            </p>
          ) : null}
        </fieldset>
        <fieldset>
          <legend className="text-sm font-medium text-ink-800">Covariance</legend>
          <div className="mt-1 grid gap-2 text-sm">
            <label className="flex items-center gap-1.5">
              <input type="checkbox" checked={fb} onChange={(e) => setFb(e.target.checked)} /> Forward–backward
              averaging
            </label>
            <label className="flex items-center gap-1.5">
              Spatial smoothing subarray L
              <input
                aria-label="Smoothing subarray"
                type="number"
                min={2}
                placeholder="none"
                className={cn(inputClass, 'w-24')}
                value={smoothing}
                onChange={(e) => setSmoothing(e.target.value)}
                aria-invalid={fieldError('smoothingSubarray') ? true : undefined}
              />
              {elements ? (
                <span className="text-xs text-ink-500">
                  (for coherent sources, about {Math.ceil((2 * elements) / 3)})
                </span>
              ) : null}
            </label>
            <label className="flex items-center gap-1.5">
              <input type="checkbox" checked={single} onChange={(e) => setSingle(e.target.checked)} /> Single-snapshot
              arrangement, L =
              <input
                aria-label="Single-snapshot subarray"
                type="number"
                min={2}
                placeholder={elements ? String(Math.floor(elements / 2) + 1) : ''}
                className={cn(inputClass, 'w-20')}
                value={singleL}
                disabled={!single}
                onChange={(e) => setSingleL(e.target.value)}
              />
            </label>
            {fieldError('smoothingSubarray') ? (
              <p className="text-xs font-medium text-coral-600">{fieldError('smoothingSubarray')}</p>
            ) : null}
          </div>
        </fieldset>
      </div>
      {error ? <FormMessage tone="error">{error.message}</FormMessage> : null}
      <div>
        <Button type="submit" disabled={busy || !dataset}>
          {busy ? 'Starting…' : 'Estimate bearings'}
        </Button>
      </div>
    </form>
  );
}
