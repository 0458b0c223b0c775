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
import type { StudyDto } from '@/lib/data/studies';
import { studyRequestSchema, type StudyRequest } from '@/lib/validations/study';
import { METHOD_LABELS, VARIABLE_LABELS } from './labels';

/**
 * What the inputs hold: text as typed, under the names of the request fields
 * (lib/validations/study.ts) so that the schema's and the server's errors land
 * on them. `arrayId` is "inline" for elements and spacing typed in.
 */
type StudyFormValues = {
  name: string;
  arrayId: string;
  array: { elements: string; spacingWavelengths: string };
  sources: { bearingsDeg: string; powersDb: string; correlation: string };
  snapshots: string;
  sweep: { variable: StudyRequest['sweep']['variable']; values: string };
  methods: string[];
  trials: string;
  seed: string;
  forwardBackward: boolean;
  smoothingMode: 'none' | 'auto' | 'size';
  smoothing: string;
};

const numbers = (text: string) =>
  text
    .split(/[,\s]+/)
    .filter(Boolean)
    .map(Number);
/** A typed number; an empty box is NaN, which the schema refuses as "must be a number". */
const num = (text: string) => (text.trim() === '' ? NaN : Number(text));

/** The POST /api/v1/studies body the inputs describe (validated by studyRequestSchema afterwards). */
export function studyRequestFromForm(v: StudyFormValues): unknown {
  const values = numbers(v.sweep.values);
  const body: Record<string, unknown> = {
    name: v.name.trim() || 'Untitled study',
    sources: {
      bearingsDeg: numbers(v.sources.bearingsDeg),
      powersDb: numbers(v.sources.powersDb),
      correlation: num(v.sources.correlation),
    },
    snapshots: num(v.snapshots),
    sweep: { variable: v.sweep.variable, values },
    methods: v.methods,
    trials: num(v.trials),
    seed: num(v.seed),
    forwardBackward: v.forwardBackward,
    smoothing: v.smoothingMode === 'size' ? num(v.smoothing) : v.smoothingMode,
  };
  // When M is swept the sweep values set it; the stored base M is the smallest of them.
  const finite = values.filter(Number.isFinite);
  const baseElements = v.sweep.variable === 'elements' && finite.length ? Math.min(...finite) : num(v.array.elements);
  if (v.arrayId === 'inline')
    body.array = { elements: baseElements, spacingWavelengths: num(v.array.spacingWavelengths) };
  else body.arrayId = Number(v.arrayId);
  return body;
}

const schemaResolver = zodResolver(studyRequestSchema);
const resolver: Resolver<StudyFormValues, unknown, StudyRequest> = (values, context, options) =>
  schemaResolver(studyRequestFromForm(values) as never, context, options as never) as unknown as ReturnType<
    Resolver<StudyFormValues, unknown, StudyRequest>
  >;

const DEFAULTS: StudyFormValues = {
  name: '',
  arrayId: 'inline',
  array: { elements: '10', spacingWavelengths: '0.5' },
  sources: { bearingsDeg: '0', powersDb: '0', correlation: '0' },
  snapshots: '100',
  sweep: { variable: 'snr', values: '-10, -5, 0, 5, 10, 20' },
  methods: ['root-music', 'esprit-tls'],
  trials: '200',
  seed: '1',
  forwardBackward: false,
  smoothingMode: 'none',
  smoothing: '6',
};

/** Scenario, sweep, methods and trials; submits POST /api/v1/studies and opens the study. */
export function StudyForm({ arrays }: { arrays: ArrayChoice[] }) {
  const router = useRouter();
  const hydrated = useHydrated();
  const usable = arrays.filter((a) => a.disabledElements.length === 0);
  const form = useForm<StudyFormValues, unknown, StudyRequest>({ resolver, defaultValues: DEFAULTS });
  const { register, handleSubmit, setError, control, formState } = form;
  const { errors, isSubmitting, isSubmitSuccessful } = formState;
  const [variable, arraySource, smoothingMode] = useWatch({
    control,
    name: ['sweep.variable', 'arrayId', 'smoothingMode'],
  });
  const sweepsElements = variable === 'elements';
  const fieldError = (...paths: string[]) => errorAt(errors, ...paths);

  const submit = handleSubmit(async (request) => {
    try {
      const created = await apiSend<Pick<StudyDto, 'id'>>('POST', '/api/v1/studies', request);
      router.push(`/studies/${created.id}`);
    } catch (err) {
      if (err instanceof ClientApiError) {
        applyServerFields(setError, err.fields);
        setError('root.server', { type: 'server', message: err.message });
      } else
        setError('root.server', {
          type: 'server',
          message: 'The study could not be started; check your connection and try again.',
        });
      throw err;
    }
  });

  const unit = variable === 'snr' ? 'dB' : variable === 'snapshots' ? 'snapshots' : 'elements';
  const busy = isSubmitting || (isSubmitSuccessful && !errors.root);
  const message =
    errors.root?.server?.message ??
    (Object.keys(errors).length ? 'Some values need attention: see the messages beside them.' : null);
  return (
    <form onSubmit={(e) => submit(e).catch(() => undefined)} className="grid gap-6 p-5" noValidate>
      <fieldset disabled={!hydrated} className="contents">
        <Field
          id="study-name"
          label="Name"
          {...register('name')}
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
              {...register('arrayId')}
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
            <FieldError id="study-array" error={fieldError('arrayId')} />
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
                  readOnly
                  hint="Set by the sweep values below"
                  error={fieldError('array', 'array.elements')}
                />
              ) : (
                <Field
                  id="study-elements"
                  label="Elements M"
                  inputMode="numeric"
                  {...register('array.elements')}
                  error={fieldError('array.elements', 'array')}
                />
              )}
              <Field
                id="study-spacing"
                label="Spacing d (wavelengths)"
                inputMode="decimal"
                {...register('array.spacingWavelengths')}
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
            {...register('sources.bearingsDeg')}
            hint="Comma-separated, from broadside"
            error={fieldError('sources.bearingsDeg', 'sources')}
          />
          <Field
            id="study-powers"
            label="Powers (dB, per-element SNR)"
            {...register('sources.powersDb')}
            hint="One per bearing"
            error={fieldError('sources.powersDb')}
          />
          <Field
            id="study-correlation"
            label="Correlation ρ (0–1)"
            inputMode="decimal"
            {...register('sources.correlation')}
            error={fieldError('sources.correlation')}
          />
        </fieldset>

        <fieldset className="grid gap-4 sm:grid-cols-3">
          <legend className="mb-2 text-sm font-semibold text-ink-800">Sweep</legend>
          <div>
            <label htmlFor="study-variable" className="block text-sm font-medium text-ink-800">
              Swept variable
            </label>
            <select id="study-variable" className={cn(inputClass, 'mt-1')} {...register('sweep.variable')}>
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
            {...register('sweep.values')}
            hint={
              variable === 'snr'
                ? 'SNR of the first source; the others keep their offsets'
                : 'Comma-separated whole numbers'
            }
            error={fieldError('sweep.values', 'sweep')}
          />
          {variable !== 'snapshots' ? (
            <Field
              id="study-snapshots"
              label="Snapshots N"
              inputMode="numeric"
              {...register('snapshots')}
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
                <input type="checkbox" value={k} {...register('methods')} />
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
            {...register('trials')}
            error={fieldError('trials')}
          />
          <Field id="study-seed" label="Seed" inputMode="numeric" {...register('seed')} error={fieldError('seed')} />
          <div>
            <label htmlFor="study-smoothing" className="block text-sm font-medium text-ink-800">
              Spatial smoothing
            </label>
            <select id="study-smoothing" className={cn(inputClass, 'mt-1')} {...register('smoothingMode')}>
              <option value="none">None</option>
              <option value="auto">Auto (≈ 2M/3)</option>
              <option value="size">Subarray size…</option>
            </select>
            {smoothingMode === 'size' ? (
              <input
                aria-label="Smoothing subarray size"
                className={cn(inputClass, 'mt-2')}
                {...register('smoothing')}
              />
            ) : null}
            {fieldError('smoothing') ? (
              <p className="mt-1 text-xs font-medium text-coral-600">{fieldError('smoothing')}</p>
            ) : null}
          </div>
          <label className="flex items-center gap-2 self-end pb-2 text-sm">
            <input type="checkbox" {...register('forwardBackward')} /> Forward–backward averaging
          </label>
        </fieldset>

        {message ? <FormMessage tone="error">{message}</FormMessage> : null}
        <div>
          <Button type="submit" disabled={busy}>
            {busy ? 'Starting…' : 'Start study'}
          </Button>
        </div>
      </fieldset>
    </form>
  );
}
