'use client';
import { useMemo } from 'react';
import { useRouter } from 'next/navigation';
import { useForm, useWatch, type Resolver } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { Button } from '@/components/ui/button';
import { FieldError, FormMessage, inputClass } from '@/components/ui/field';
import { apiSend, ClientApiError } from '@/lib/client/fetcher';
import { applyServerFields, errorAt } from '@/lib/client/form-errors';
import { cn } from '@/lib/client/cn';
import { useHydrated } from '@/lib/client/use-hydrated';
import type { ArrayChoice, DatasetDto } from '@/lib/data/datasets';
import type { EstimateRunDto } from '@/lib/data/estimates';
import { estimateRequestSchema, type EstimateRequest } from '@/lib/validations/estimate';
import { METHOD_LABELS } from './labels';

export type DatasetOption = Pick<DatasetDto, 'id' | 'name' | 'elements' | 'snapshots' | 'format'>;

const METHODS = Object.keys(METHOD_LABELS);

/**
 * What the inputs hold, as typed, under the names of the request fields
 * (lib/validations/estimate.ts) so that the schema's and the server's errors
 * land on them. `geometry` picks a saved array (`arrayId` holds its
 * "id:revision") or the spacing alone; `sourceCountRule` "given" sends
 * `sourceCount` instead.
 */
type EstimateFormValues = {
  datasetId: string;
  geometry: 'array' | 'inline';
  arrayId: string;
  array: { spacingWavelengths: string };
  methods: string[];
  sourceCountRule: 'mdl' | 'aic' | 'given';
  sourceCount: string;
  forwardBackward: boolean;
  smoothingSubarray: string;
  singleSnapshot: boolean;
  singleSnapshotSubarray: string;
  applyCalibration: boolean;
};

const keyOf = (a: ArrayChoice) => `${a.id}:${a.revision}`;
/** A typed number; an empty box is NaN, which the schema refuses as "must be a number". */
const num = (text: string) => (text.trim() === '' ? NaN : Number(text));

/** The saved array revisions that fit the dataset, and the chosen one (the first without disabled elements by default). */
function arrayChoice(arrays: ArrayChoice[], dataset: DatasetOption | undefined, key: string) {
  const matching = arrays.filter((a) => !dataset || a.elements === dataset.elements);
  const chosen =
    matching.find((a) => keyOf(a) === key) ?? matching.find((a) => !a.disabledElements.length) ?? matching[0];
  return { matching, chosen };
}

/** The longest run of enabled neighbours, 1-based, as "a–b (n elements)" (lib/doa/elements.ts picks the same one). */
function longestRunText(elements: number, disabled: number[]): string {
  const off = new Set(disabled);
  let best = { start: 0, length: 0 };
  let start = -1;
  for (let m = 1; m <= elements; m++) {
    if (off.has(m)) {
      start = -1;
      continue;
    }
    if (start < 0) start = m;
    if (m - start + 1 > best.length) best = { start, length: m - start + 1 };
  }
  return `${best.start}–${best.start + best.length - 1} (${best.length} elements)`;
}

/** The POST /api/v1/estimates body the inputs describe (validated by estimateRequestSchema afterwards). */
function estimateRequestFromForm(v: EstimateFormValues, arrays: ArrayChoice[], datasets: DatasetOption[]): unknown {
  const dataset = datasets.find((d) => String(d.id) === v.datasetId);
  const body: Record<string, unknown> = { datasetId: dataset?.id, methods: v.methods, includeSpectrum: true };
  if (v.geometry === 'array') {
    const { chosen } = arrayChoice(arrays, dataset, v.arrayId);
    if (chosen) {
      body.arrayId = chosen.id;
      body.arrayRevision = chosen.revision;
      if (chosen.calibrated) body.applyCalibration = v.applyCalibration;
    }
  } else body.array = { elements: dataset?.elements ?? 0, spacingWavelengths: num(v.array.spacingWavelengths) };
  if (v.sourceCountRule === 'given') body.sourceCount = num(v.sourceCount);
  else body.sourceCountRule = v.sourceCountRule;
  if (v.forwardBackward) body.forwardBackward = true;
  if (v.smoothingSubarray.trim()) body.smoothingSubarray = num(v.smoothingSubarray);
  if (v.singleSnapshot) {
    body.singleSnapshot = true;
    if (v.singleSnapshotSubarray.trim()) body.singleSnapshotSubarray = num(v.singleSnapshotSubarray);
  }
  return body;
}

const schemaResolver = zodResolver(estimateRequestSchema);

/** Picks data, geometry, methods and covariance options; submits an asynchronous run and opens it. */
export function EstimateForm({
  arrays,
  datasets,
  initialDatasetId,
}: {
  arrays: ArrayChoice[];
  datasets: DatasetOption[];
  initialDatasetId?: number;
}) {
  const router = useRouter();
  const hydrated = useHydrated();
  const resolver = useMemo<Resolver<EstimateFormValues, unknown, EstimateRequest>>(
    () => (values, context, options) =>
      schemaResolver(
        estimateRequestFromForm(values, arrays, datasets) as never,
        context,
        options as never,
      ) as unknown as ReturnType<Resolver<EstimateFormValues, unknown, EstimateRequest>>,
    [arrays, datasets],
  );
  const form = useForm<EstimateFormValues, unknown, EstimateRequest>({
    resolver,
    defaultValues: {
      datasetId: String(initialDatasetId ?? datasets[0]?.id ?? ''),
      geometry: arrays.length ? 'array' : 'inline',
      arrayId: '',
      array: { spacingWavelengths: '0.5' },
      methods: ['esprit-ls', 'music'],
      sourceCountRule: 'mdl',
      sourceCount: '2',
      forwardBackward: false,
      smoothingSubarray: '',
      singleSnapshot: false,
      singleSnapshotSubarray: '',
      applyCalibration: true,
    },
  });
  const { register, handleSubmit, setError, control, formState } = form;
  const { errors, isSubmitting, isSubmitSuccessful } = formState;
  const [datasetId, geometry, arrayKey, countMode, single] = useWatch({
    control,
    name: ['datasetId', 'geometry', 'arrayId', 'sourceCountRule', 'singleSnapshot'],
  });
  const dataset = datasets.find((d) => String(d.id) === datasetId);
  const { matching, chosen: chosenArray } = arrayChoice(arrays, dataset, arrayKey);
  const elements = dataset?.elements ?? 0;
  const mismatch = geometry === 'array' && chosenArray && dataset && chosenArray.elements !== dataset.elements;
  const fieldError = (...paths: string[]) => errorAt(errors, ...paths);

  const submit = handleSubmit(async (request) => {
    if (geometry === 'array' && !chosenArray) {
      setError('root.server', {
        type: 'client',
        message: `No array of your team has ${elements} elements; enter the spacing instead.`,
      });
      throw new Error('no array');
    }
    try {
      const run = await apiSend<Pick<EstimateRunDto, 'id'>>('POST', '/api/v1/estimates', request, {
        prefer: 'respond-async',
      });
      router.push(`/estimates/${run.id}`);
    } catch (err) {
      if (err instanceof ClientApiError) applyServerFields(setError, err.fields);
      setError('root.server', {
        type: 'server',
        message: err instanceof Error ? err.message : 'The run could not be started.',
      });
      throw err;
    }
  });

  const busy = isSubmitting || (isSubmitSuccessful && !errors.root);
  const message =
    errors.root?.server?.message ??
    (!dataset
      ? null
      : Object.keys(errors).length
        ? (fieldError('datasetId') ?? 'Some values need attention: see the messages beside them.')
        : null);
  const arrayNote = fieldError('arrayId', 'arrayRevision', 'array', 'array.spacingWavelengths');
  return (
    <form
      onSubmit={(e) => submit(e).catch(() => undefined)}
      className="grid gap-5 px-5 py-4"
      aria-label="New estimate"
      noValidate
    >
      <fieldset disabled={!hydrated} className="contents">
        <div className="grid gap-4 md:grid-cols-2">
          <div>
            <label htmlFor="datasetId" className="block text-sm font-medium text-ink-800">
              Dataset
            </label>
            <select id="datasetId" className={cn(inputClass, 'mt-1')} {...register('datasetId')}>
              {datasets.length === 0 ? <option value="">No datasets yet</option> : null}
              {datasets.map((d) => (
                <option key={d.id} value={String(d.id)}>
                  {d.name} ({d.snapshots} × {d.elements}, {d.format.toUpperCase()})
                </option>
              ))}
            </select>
          </div>
          <fieldset>
            <legend className="block text-sm font-medium text-ink-800">Array geometry</legend>
            <div className="mt-1 flex gap-4 text-sm">
              <label className="flex items-center gap-1.5">
                <input type="radio" value="array" {...register('geometry')} disabled={!arrays.length} /> A saved array
              </label>
              <label className="flex items-center gap-1.5">
                <input type="radio" value="inline" {...register('geometry')} /> Spacing only
              </label>
            </div>
            {geometry === 'array' ? (
              <select
                aria-label="Array"
                id="arrayId"
                className={cn(inputClass, 'mt-2')}
                {...register('arrayId')}
                value={chosenArray ? keyOf(chosenArray) : ''}
                aria-invalid={mismatch || arrayNote ? true : undefined}
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
                  {...register('array.spacingWavelengths')}
                  aria-invalid={arrayNote ? true : undefined}
                />
              </div>
            )}
            <p
              id="arrayId-note"
              className={cn('mt-1 text-xs', mismatch || arrayNote ? 'text-coral-700' : 'text-ink-500')}
            >
              {arrayNote ??
                (mismatch
                  ? `The array has ${chosenArray!.elements} elements but the dataset has ${elements} columns.`
                  : 'Only arrays whose element count equals the dataset’s columns are listed; each saved revision is a choice, and the run keeps the one you pick.')}
            </p>
            {geometry === 'array' && chosenArray?.calibrated ? (
              <label className="mt-2 flex items-center gap-1.5 text-sm">
                <input type="checkbox" {...register('applyCalibration')} /> Apply the calibration of revision{' '}
                {chosenArray.revision} (divide each element by its gain and phase)
              </label>
            ) : null}
            {geometry === 'array' && chosenArray?.disabledElements.length ? (
              <p className="mt-1 text-xs text-amber-800" data-testid="elements-used">
                Element{chosenArray.disabledElements.length === 1 ? '' : 's'} {chosenArray.disabledElements.join(', ')}{' '}
                disabled. MUSIC, Bartlett and MVDR will use the{' '}
                {chosenArray.elements - chosenArray.disabledElements.length} enabled elements at their true positions;
                ESPRIT and root-MUSIC (and any run with smoothing, forward–backward or single-snapshot) will use
                elements {longestRunText(chosenArray.elements, chosenArray.disabledElements)}.
              </p>
            ) : null}
          </fieldset>
        </div>

        <fieldset>
          <legend className="text-sm font-medium text-ink-800">Methods</legend>
          <div className="mt-1 flex flex-wrap gap-x-5 gap-y-2 text-sm">
            {METHODS.map((m) => (
              <label key={m} className="flex items-center gap-1.5">
                <input type="checkbox" value={m} {...register('methods')} />
                {METHOD_LABELS[m]}
              </label>
            ))}
          </div>
          <FieldError id="methods" error={fieldError('methods', 'method')} />
        </fieldset>

        <div className="grid gap-4 md:grid-cols-2">
          <fieldset>
            <legend className="text-sm font-medium text-ink-800">Source count</legend>
            <div className="mt-1 flex flex-wrap items-center gap-4 text-sm">
              <label className="flex items-center gap-1.5">
                <input type="radio" value="mdl" {...register('sourceCountRule')} /> MDL (default)
              </label>
              <label className="flex items-center gap-1.5">
                <input type="radio" value="aic" {...register('sourceCountRule')} /> AIC
              </label>
              <label className="flex items-center gap-1.5">
                <input type="radio" value="given" {...register('sourceCountRule')} /> Known:
              </label>
              <input
                aria-label="Known source count"
                type="number"
                min={0}
                className={cn(inputClass, 'w-20')}
                {...register('sourceCount')}
                disabled={countMode !== 'given'}
                aria-invalid={fieldError('sourceCount') ? true : undefined}
                aria-describedby={fieldError('sourceCount') ? 'sourceCount-error' : undefined}
              />
            </div>
            <FieldError id="sourceCount" error={fieldError('sourceCount', 'sourceCountRule')} />
          </fieldset>
          <fieldset>
            <legend className="text-sm font-medium text-ink-800">Covariance</legend>
            <div className="mt-1 grid gap-2 text-sm">
              <label className="flex items-center gap-1.5">
                <input type="checkbox" {...register('forwardBackward')} /> Forward–backward averaging
              </label>
              <label className="flex items-center gap-1.5">
                Spatial smoothing subarray L
                <input
                  aria-label="Smoothing subarray"
                  type="number"
                  min={2}
                  placeholder="none"
                  className={cn(inputClass, 'w-24')}
                  {...register('smoothingSubarray')}
                  aria-invalid={fieldError('smoothingSubarray') ? true : undefined}
                />
                {elements ? (
                  <span className="text-xs text-ink-500">
                    (for coherent sources, about {Math.ceil((2 * elements) / 3)})
                  </span>
                ) : null}
              </label>
              <label className="flex items-center gap-1.5">
                <input type="checkbox" {...register('singleSnapshot')} /> Single-snapshot arrangement, L =
                <input
                  aria-label="Single-snapshot subarray"
                  type="number"
                  min={2}
                  placeholder={elements ? String(Math.floor(elements / 2) + 1) : ''}
                  className={cn(inputClass, 'w-20')}
                  {...register('singleSnapshotSubarray')}
                  disabled={!single}
                  aria-invalid={fieldError('singleSnapshotSubarray') ? true : undefined}
                />
              </label>
              <FieldError
                id="smoothingSubarray"
                error={fieldError('smoothingSubarray', 'singleSnapshotSubarray', 'singleSnapshot', 'forwardBackward')}
              />
            </div>
          </fieldset>
        </div>
        {message ? <FormMessage tone="error">{message}</FormMessage> : null}
        <div>
          <Button type="submit" disabled={busy || !dataset}>
            {busy ? 'Starting…' : 'Estimate bearings'}
          </Button>
        </div>
      </fieldset>
    </form>
  );
}
