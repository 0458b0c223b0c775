'use client';
import { useRouter } from 'next/navigation';
import { useForm, useWatch, type Resolver } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { Field, FieldError, FormMessage, inputClass } from '@/components/ui/field';
import { Button } from '@/components/ui/button';
import { apiSend, ClientApiError } from '@/lib/client/fetcher';
import { applyServerFields, errorAt } from '@/lib/client/form-errors';
import { cn } from '@/lib/client/cn';
import { useHydrated } from '@/lib/client/use-hydrated';
import type { ArrayChoice } from '@/lib/data/datasets';
import {
  BTR_DEFAULTS,
  BTR_ESTIMATORS,
  BTR_METHODS,
  BTR_WINDOWS,
  bearingTimeRecordRequestSchema,
  type BearingTimeRecordRequest,
} from '@/lib/validations/bearing-time-record';
import { BTR_METHOD_LABELS } from './types';

/** A recording the form offers: WAV carries its rate; NPY needs one typed in. */
export interface RecordingChoice {
  id: number;
  name: string;
  format: string;
  channels: number;
  sampleRate: number | null;
  durationS: number | null;
  /** The array the recording was uploaded for, if any. */
  arrayId: number | null;
}

/**
 * What the inputs hold: text as typed, under the request's field names
 * (lib/validations/bearing-time-record.ts) so the schema's and the server's
 * errors land on them. `arrayId` is "inline" for elements and spacing typed in;
 * an empty optional box means "use the default".
 */
type FormValues = {
  name: string;
  datasetId: string;
  sampleRate: string;
  arrayId: string;
  array: { elements: string; spacingM: string };
  propagationSpeedMps: string;
  band: { lowHz: string; highHz: string };
  blockSeconds: string;
  blockOverlap: string;
  fftLength: string;
  hop: string;
  window: string;
  method: string;
  bearingEstimator: string;
  sourceCountMode: 'mdl' | 'aic' | 'given';
  sourceCount: string;
  gratingLobes: string;
};

const num = (text: string) => (text.trim() === '' ? NaN : Number(text));
const optional = (text: string) => (text.trim() === '' ? undefined : Number(text));

/** The POST /api/v1/bearing-time-records body the inputs describe (validated by the shared schema afterwards). */
export function recordRequestFromForm(v: FormValues, recordings: RecordingChoice[]): unknown {
  const recording = recordings.find((r) => String(r.id) === v.datasetId);
  const body: Record<string, unknown> = {
    ...(v.name.trim() ? { name: v.name.trim() } : {}),
    datasetId: num(v.datasetId),
    band: { lowHz: num(v.band.lowHz), highHz: num(v.band.highHz) },
    blockSeconds: num(v.blockSeconds),
    blockOverlap: num(v.blockOverlap) / 100,
    fftLength: num(v.fftLength),
    window: v.window,
    method: v.method,
    gratingLobes: v.gratingLobes,
  };
  if (recording && recording.sampleRate === null) body.sampleRate = num(v.sampleRate);
  if (v.arrayId === 'inline') body.array = { elements: num(v.array.elements), spacingM: num(v.array.spacingM) };
  else body.arrayId = Number(v.arrayId);
  const speed = optional(v.propagationSpeedMps);
  if (speed !== undefined) body.propagationSpeedMps = speed;
  const hop = optional(v.hop);
  if (hop !== undefined) body.hop = hop;
  if (v.bearingEstimator) body.bearingEstimator = v.bearingEstimator;
  if (v.sourceCountMode === 'given') body.sourceCount = num(v.sourceCount);
  else body.sourceCountRule = v.sourceCountMode;
  return body;
}

const FFT_LENGTHS = [128, 256, 512, 1024, 2048, 4096, 8192];
const ESTIMATOR_LABELS: Record<string, string> = {
  'spectrum-peaks': 'peaks of the wideband spectrum',
  'per-bin-music': 'per-bin MUSIC, combined across bins',
  'per-bin-root-music': 'per-bin root-MUSIC, combined across bins',
};

function Select({
  id,
  label,
  hint,
  error,
  children,
  ...rest
}: React.ComponentProps<'select'> & { id: string; label: string; hint?: string; error?: string }) {
  const describedBy = [error ? `${id}-error` : null, hint ? `${id}-hint` : null].filter(Boolean).join(' ') || undefined;
  return (
    <div>
      <label htmlFor={id} className="block text-sm font-medium text-ink-800">
        {label}
      </label>
      <select
        id={id}
        className={cn(inputClass, 'mt-1')}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy}
        {...rest}
      >
        {children}
      </select>
      {hint ? (
        <p id={`${id}-hint`} className="mt-1 text-xs text-ink-500">
          {hint}
        </p>
      ) : null}
      <FieldError id={id} error={error} />
    </div>
  );
}

/** Recording, array, band, blocks, STFT and method; submits the record and opens it. */
export function RecordForm({
  recordings,
  arrays,
  initialDatasetId,
}: {
  recordings: RecordingChoice[];
  arrays: ArrayChoice[];
  initialDatasetId?: number;
}) {
  const router = useRouter();
  const hydrated = useHydrated();
  const usable = arrays.filter((a) => a.disabledElements.length === 0);
  const schemaResolver = zodResolver(bearingTimeRecordRequestSchema);
  const resolver: Resolver<FormValues, unknown, BearingTimeRecordRequest> = (values, context, options) =>
    schemaResolver(
      recordRequestFromForm(values, recordings) as never,
      context,
      options as never,
    ) as unknown as ReturnType<Resolver<FormValues, unknown, BearingTimeRecordRequest>>;
  const first = recordings.find((r) => r.id === initialDatasetId) ?? recordings[0];
  const matching = first
    ? (usable.find((a) => a.id === first.arrayId && a.elements === first.channels) ??
      usable.find((a) => a.elements === first.channels))
    : undefined;
  const form = useForm<FormValues, unknown, BearingTimeRecordRequest>({
    resolver,
    defaultValues: {
      name: '',
      datasetId: first ? String(first.id) : '',
      sampleRate: '',
      arrayId: matching ? String(matching.id) : 'inline',
      array: { elements: first ? String(first.channels) : '16', spacingM: '0.25' },
      propagationSpeedMps: '',
      band: { lowHz: '500', highHz: '2500' },
      blockSeconds: String(BTR_DEFAULTS.blockSeconds),
      blockOverlap: String(100 * BTR_DEFAULTS.blockOverlap),
      fftLength: String(BTR_DEFAULTS.fftLength),
      hop: '',
      window: BTR_DEFAULTS.window,
      method: BTR_DEFAULTS.method,
      bearingEstimator: '',
      sourceCountMode: BTR_DEFAULTS.sourceCountRule,
      sourceCount: '2',
      gratingLobes: BTR_DEFAULTS.gratingLobes,
    },
  });
  const { register, handleSubmit, setError, control, formState } = form;
  const { errors, isSubmitting, isSubmitSuccessful } = formState;
  const [datasetId, arraySource, countMode, fftLength] = useWatch({
    control,
    name: ['datasetId', 'arrayId', 'sourceCountMode', 'fftLength'],
  });
  const recording = recordings.find((r) => String(r.id) === datasetId);
  const fieldError = (...paths: string[]) => errorAt(errors, ...paths);
  const nyquist = recording?.sampleRate ? recording.sampleRate / 2 : null;

  const submit = handleSubmit(async (request) => {
    try {
      const created = await apiSend<{ id: number }>('POST', '/api/v1/bearing-time-records', request);
      router.push(`/bearing-time-records/${created.id}`);
    } catch (err) {
      if (err instanceof ClientApiError) {
        applyServerFields(setError, err.fields);
        setError('root.server', { type: 'server', message: err.message });
      } else
        setError('root.server', {
          type: 'server',
          message: 'The record could not be started; check your connection and try again.',
        });
      throw err;
    }
  });

  const busy = isSubmitting || (isSubmitSuccessful && !errors.root);
  const message =
    errors.root?.server?.message ??
    (Object.keys(errors).length ? 'Some values need attention: see the messages beside them.' : null);
  const legend = 'mb-2 text-sm font-semibold text-ink-800';

  if (!recordings.length)
    return (
      <p className="p-5 text-sm text-ink-600">
        No time-series recording in your team yet: upload a multichannel WAV on the Datasets page first.
      </p>
    );

  return (
    <form
      onSubmit={(e) => submit(e).catch(() => undefined)}
      className="grid gap-6 p-5"
      noValidate
      data-testid="btr-form"
    >
      <fieldset disabled={!hydrated} className="contents">
        <div className="grid gap-4 sm:grid-cols-2">
          <Select
            id="btr-dataset"
            label="Recording"
            {...register('datasetId')}
            error={fieldError('datasetId')}
            hint="A multichannel time series: channel m is element m of the line. The raw recording is read in blocks, never whole."
          >
            {recordings.map((r) => (
              <option key={r.id} value={r.id}>
                {r.name} ({r.format.toUpperCase()}, {r.channels} ch
                {r.sampleRate ? `, ${r.sampleRate} Hz` : ''}
                {r.durationS ? `, ${Math.round(r.durationS)} s` : ''})
              </option>
            ))}
          </Select>
          <Field
            id="btr-name"
            label="Name"
            {...register('name')}
            placeholder={recording ? recording.name : 'optional'}
            hint="Optional; the recording's name when empty."
            error={fieldError('name')}
          />
          {recording && recording.sampleRate === null ? (
            <Field
              id="btr-sample-rate"
              label="Sample rate (Hz)"
              inputMode="decimal"
              {...register('sampleRate')}
              hint="NPY files carry no rate: give samples per second per channel."
              error={fieldError('sampleRate')}
            />
          ) : null}
        </div>

        <fieldset className="grid gap-4 sm:grid-cols-3">
          <legend className={legend}>Array</legend>
          <Select
            id="btr-array"
            label="Geometry"
            {...register('arrayId')}
            error={fieldError('arrayId', 'array')}
            hint="A saved array uses its latest revision's spacing and propagation speed. Its element count must equal the recording's channel count."
          >
            {usable.map((a) => (
              <option key={a.revisionId} value={a.id}>
                {a.name} r{a.revision} (M = {a.elements}, d = {a.spacingWavelengths} λ)
              </option>
            ))}
            <option value="inline">Type elements and spacing…</option>
          </Select>
          {arraySource === 'inline' ? (
            <>
              <Field
                id="btr-elements"
                label="Elements M"
                inputMode="numeric"
                {...register('array.elements')}
                hint={recording ? `The recording has ${recording.channels} channels.` : undefined}
                error={fieldError('array.elements')}
              />
              <Field
                id="btr-spacing"
                label="Spacing d (m)"
                inputMode="decimal"
                {...register('array.spacingM')}
                hint="Each bin uses its own d/λ = d·f/c."
                error={fieldError('array.spacingM')}
              />
            </>
          ) : null}
          <Field
            id="btr-speed"
            label="Propagation speed c (m/s)"
            inputMode="decimal"
            {...register('propagationSpeedMps')}
            placeholder={`default: the array's, else ${BTR_DEFAULTS.propagationSpeedMps}`}
            hint={`Empty: the array revision's speed, else ${BTR_DEFAULTS.propagationSpeedMps} m/s (sea water). Needed with a typed spacing.`}
            error={fieldError('propagationSpeedMps')}
          />
        </fieldset>

        <fieldset className="grid gap-4 sm:grid-cols-3">
          <legend className={legend}>Band and blocks</legend>
          <Field
            id="btr-low"
            label="Band low (Hz)"
            inputMode="decimal"
            {...register('band.lowHz')}
            hint="Every FFT bin whose centre lies in the band is used (DC and Nyquist never)."
            error={fieldError('band.lowHz', 'band')}
          />
          <Field
            id="btr-high"
            label="Band high (Hz)"
            inputMode="decimal"
            {...register('band.highHz')}
            hint={
              nyquist
                ? `At most the Nyquist frequency, ${nyquist} Hz here. Bins where d > λ/2 can alias; see below.`
                : 'At most half the sample rate (Nyquist).'
            }
            error={fieldError('band.highHz')}
          />
          <Select
            id="btr-grating"
            label="Bins with grating lobes"
            {...register('gratingLobes')}
            error={fieldError('gratingLobes')}
            hint="Default: leave out bins where the spacing exceeds half a wavelength; or keep them and count them."
          >
            <option value="exclude">Leave out (default)</option>
            <option value="include">Keep, flagged</option>
          </Select>
          <Field
            id="btr-block"
            label="Block length (s)"
            inputMode="decimal"
            {...register('blockSeconds')}
            hint={`One row of the record; default ${BTR_DEFAULTS.blockSeconds} s. Longer blocks: more frames, smaller σ, coarser time.`}
            error={fieldError('blockSeconds')}
          />
          <Field
            id="btr-overlap"
            label="Block overlap (%)"
            inputMode="decimal"
            {...register('blockOverlap')}
            hint={`Share of a block repeated in the next, 0 to below 100; default ${100 * BTR_DEFAULTS.blockOverlap} %.`}
            error={fieldError('blockOverlap')}
          />
        </fieldset>

        <fieldset className="grid gap-4 sm:grid-cols-3">
          <legend className={legend}>Short-time Fourier transform</legend>
          <Select
            id="btr-fft"
            label="FFT length"
            {...register('fftLength')}
            error={fieldError('fftLength')}
            hint={`Samples per frame; default ${BTR_DEFAULTS.fftLength}. Bin width = sample rate / FFT length${recording?.sampleRate ? ` = ${(recording.sampleRate / Number(fftLength || 1)).toFixed(2)} Hz` : ''}.`}
          >
            {FFT_LENGTHS.map((n) => (
              <option key={n} value={n}>
                {n}
              </option>
            ))}
          </Select>
          <Field
            id="btr-hop"
            label="Hop (samples)"
            inputMode="numeric"
            {...register('hop')}
            placeholder={`default: ${fftLength || BTR_DEFAULTS.fftLength}`}
            hint="Samples between frame starts; empty means the FFT length (no overlap between frames)."
            error={fieldError('hop')}
          />
          <Select
            id="btr-window"
            label="Window"
            {...register('window')}
            error={fieldError('window')}
            hint="Periodic Hann by default; Hamming, or rectangular (no taper)."
          >
            {BTR_WINDOWS.map((w) => (
              <option key={w} value={w}>
                {w}
                {w === BTR_DEFAULTS.window ? ' (default)' : ''}
              </option>
            ))}
          </Select>
        </fieldset>

        <fieldset className="grid gap-4 sm:grid-cols-3">
          <legend className={legend}>Method</legend>
          <Select
            id="btr-method"
            label="Wideband spectrum"
            {...register('method')}
            error={fieldError('method')}
            hint="The narrowband spectra of every bin in the band, each normalised to its peak, averaged incoherently. Default MUSIC."
          >
            {BTR_METHODS.map((m) => (
              <option key={m} value={m}>
                {BTR_METHOD_LABELS[m] ?? m}
              </option>
            ))}
          </Select>
          <Select
            id="btr-estimator"
            label="Bearings per block"
            {...register('bearingEstimator')}
            error={fieldError('bearingEstimator')}
            hint="Default: per-bin MUSIC with MUSIC, the wideband peaks otherwise. Per-bin bearings are combined with inverse-CRB weights."
          >
            <option value="">Default for the method</option>
            {BTR_ESTIMATORS.map((e) => (
              <option key={e} value={e}>
                {ESTIMATOR_LABELS[e] ?? e}
              </option>
            ))}
          </Select>
          <div className="grid gap-2">
            <Select
              id="btr-count-mode"
              label="Sources per block"
              {...register('sourceCountMode')}
              error={fieldError('sourceCountRule')}
              hint="MDL (default) or AIC on each bin's eigenvalues, median over the bins; or a fixed K."
            >
              <option value="mdl">MDL per bin (default)</option>
              <option value="aic">AIC per bin</option>
              <option value="given">Given K</option>
            </Select>
            {countMode === 'given' ? (
              <Field
                id="btr-count"
                label="K"
                inputMode="numeric"
                {...register('sourceCount')}
                error={fieldError('sourceCount')}
              />
            ) : null}
          </div>
        </fieldset>

        {message ? <FormMessage tone="error">{message}</FormMessage> : null}
        <div className="flex items-center gap-3">
          <Button type="submit" disabled={busy} data-testid="btr-submit">
            {busy ? 'Starting…' : 'Start record'}
          </Button>
          <p className="text-xs text-ink-500">Runs in the background with progress; you can stop it.</p>
        </div>
      </fieldset>
    </form>
  );
}
