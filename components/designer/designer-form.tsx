'use client';

/**
 * Every number of the design as a form, validated by the same zod schema the
 * arrays API uses (arrayInputSchema). The form follows the designer state
 * (`values`); each edit that passes the schema is sent back as one `replace`
 * action, so canvas and form never disagree. Errors sit under their fields,
 * tied with aria-describedby.
 */
import { useEffect, useState } from 'react';
import { FormProvider, useForm, useFormContext, useWatch } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import {
  arrayInputSchema,
  MAX_ELEMENTS,
  MIN_ELEMENTS,
  type ArrayInput,
  type ArrayInputRaw,
  type ResolvedGeometry,
} from '@/lib/validations/array';
import { type DesignerAction, type DesignerDraft } from '@/lib/designer/state';
import { MediumPanel, NumberField } from './medium-panel';
import { cn } from '@/lib/client/cn';

export interface DesignerFormProps {
  draft: DesignerDraft;
  geometry: ResolvedGeometry;
  dispatch: (action: DesignerAction) => void;
  readOnly?: boolean;
  onSave?: (input: ArrayInput) => void | Promise<void>;
  /** Field errors from the server (422 `fields`), shown under their fields. */
  serverErrors?: Record<string, string[]>;
}

/** Makes the raw form values match what the designer keeps: states sized to the element count, the medium's speed. */
function prepare(values: ArrayInputRaw): ArrayInputRaw {
  const out: ArrayInputRaw = { ...values };
  const n = out.elements;
  if (
    typeof n === 'number' &&
    Number.isInteger(n) &&
    n >= MIN_ELEMENTS &&
    n <= MAX_ELEMENTS &&
    Array.isArray(out.elementStates)
  ) {
    const states = out.elementStates.slice(0, n);
    while (states.length < n) states.push({ enabled: true, gainDb: 0, phaseDeg: 0 });
    out.elementStates = states;
  }
  if (out.medium) delete out.propagationSpeedMps;
  if (Array.isArray(out.plannedSources)) {
    out.plannedSources = out.plannedSources.map((s) => (s && s.snrDb === undefined ? { bearingDeg: s.bearingDeg } : s));
  }
  return out;
}

export function DesignerForm({ draft, geometry, dispatch, readOnly = false, onSave, serverErrors }: DesignerFormProps) {
  const form = useForm<ArrayInputRaw, unknown, ArrayInput>({
    resolver: zodResolver(arrayInputSchema),
    values: draft,
    mode: 'onChange',
    resetOptions: { keepErrors: false },
  });
  const { register, getValues, handleSubmit, formState, setError, control } = form;
  const [saveState, setSaveState] = useState<'idle' | 'saving' | 'saved' | 'failed'>('idle');

  /**
   * The designer's reducer holds the one draft; the form shows it (`values`) and
   * every edit the user makes in the form goes back to the reducer as one
   * 'replace' once the whole form is valid (quantity fields with units on blur). Edits elsewhere (the canvas) reach the
   * form through `values`, which react-hook-form compares before resetting.
   */
  const sendToDraft = () => {
    if (readOnly) return;
    const parsed = arrayInputSchema.safeParse(prepare(getValues()));
    if (parsed.success) dispatch({ type: 'replace', input: parsed.data });
  };

  useEffect(() => {
    if (!serverErrors) return;
    for (const [field, messages] of Object.entries(serverErrors)) {
      if (messages.length)
        setError((field === '_' ? 'root' : field) as never, { type: 'server', message: messages.join(' ') });
    }
  }, [serverErrors, setError]);

  const spacingUnit = useWatch({ control, name: 'spacing.unit' });
  const taperKind = useWatch({ control, name: 'taper.kind' });
  const nameError = formState.errors.name?.message;
  const statesError = (formState.errors.elementStates as { message?: string } | undefined)?.message;

  const submit = handleSubmit(async () => {
    if (!onSave) return;
    setSaveState('saving');
    try {
      await onSave(draft);
      setSaveState('saved');
    } catch {
      setSaveState('failed');
    }
  });

  const section = 'space-y-3 rounded-card border border-ink-100 bg-white p-4';

  return (
    <FormProvider {...form}>
      <form onSubmit={submit} onChange={sendToDraft} noValidate data-testid="designer-form" aria-label="Array design">
        <fieldset disabled={readOnly} className="space-y-4">
          <div className={section}>
            <div>
              <label htmlFor="f-name" className="block text-xs font-medium text-ink-700">
                Name
              </label>
              <input
                id="f-name"
                className={cn(
                  'mt-1 block w-full rounded-md border bg-white px-2 py-1.5 text-sm disabled:bg-ink-50 disabled:text-ink-500',
                  nameError ? 'border-coral-500' : 'border-ink-200',
                )}
                aria-invalid={nameError ? true : undefined}
                aria-describedby={nameError ? 'f-name-error' : undefined}
                data-testid="field-name"
                {...register('name')}
              />
              {nameError ? (
                <p id="f-name-error" className="mt-1 text-xs font-medium text-coral-600">
                  {nameError}
                </p>
              ) : null}
            </div>
            <div className="grid grid-cols-2 gap-3 sm:grid-cols-3">
              <NumberField name="elements" label="Elements" step="1" />
              <NumberField name="spacing.value" label="Spacing" quantity={{ example: '12.5 mm or 0.5 lambda' }} />
              <div>
                <label htmlFor="f-spacing-unit" className="block text-xs font-medium text-ink-700">
                  Spacing unit
                </label>
                <select
                  id="f-spacing-unit"
                  data-testid="field-spacing.unit"
                  className="mt-1 block w-full rounded-md border border-ink-200 bg-white px-2 py-1.5 text-sm"
                  {...register('spacing.unit')}
                >
                  <option value="wavelength">wavelengths (λ)</option>
                  <option value="m">metres</option>
                  <option value="mm">millimetres</option>
                </select>
                {spacingUnit !== 'wavelength' ? (
                  <p className="mt-1 text-2xs text-ink-500">
                    Metres and millimetres need the analysis frequency and the medium below.
                  </p>
                ) : null}
              </div>
              <NumberField name="steerDeg" label="Steering" unit="°" />
              <NumberField name="scanSectorDeg" label="Scan sector half-width" unit="±°" />
              <div>
                <label htmlFor="f-taper" className="block text-xs font-medium text-ink-700">
                  Taper
                </label>
                <select
                  id="f-taper"
                  className="mt-1 block w-full rounded-md border border-ink-200 bg-white px-2 py-1.5 text-sm"
                  value={taperKind ?? 'uniform'}
                  onChange={(e) => {
                    const kind = e.target.value;
                    form.setValue('taper', (kind === 'chebyshev' ? { kind, sidelobeDb: 30 } : { kind }) as never, {
                      shouldValidate: true,
                      shouldDirty: true,
                    });
                  }}
                >
                  <option value="uniform">Uniform</option>
                  <option value="hann">Hann</option>
                  <option value="hamming">Hamming</option>
                  <option value="chebyshev">Dolph–Chebyshev</option>
                </select>
              </div>
              {taperKind === 'chebyshev' ? (
                <NumberField name="taper.sidelobeDb" label="Sidelobe level" unit="dB down" />
              ) : null}
              <NumberField name="snrDb" label="SNR per element" unit="dB" />
              <NumberField name="snapshots" label="Snapshots" step="1" />
            </div>
          </div>

          <div className={section}>
            <MediumPanel geometry={geometry} readOnly={readOnly} />
          </div>

          <details className={section} data-testid="element-table">
            <summary className="cursor-pointer text-sm font-semibold">
              Element calibration ({draft.elementStates.filter((e) => e.enabled).length} of {draft.elements} enabled)
            </summary>
            {statesError ? (
              <p id="f-elementStates-error" className="text-xs font-medium text-coral-600">
                {statesError}
              </p>
            ) : null}
            <div className="max-h-72 overflow-auto">
              <table className="w-full text-sm" aria-describedby={statesError ? 'f-elementStates-error' : undefined}>
                <thead className="sticky top-0 bg-white text-left text-2xs uppercase tracking-wide text-ink-500">
                  <tr>
                    <th className="py-1 pr-2">#</th>
                    <th className="py-1 pr-2">Enabled</th>
                    <th className="py-1 pr-2">Gain (dB)</th>
                    <th className="py-1">Phase (°)</th>
                  </tr>
                </thead>
                <tbody>
                  {draft.elementStates.map((_, i) => (
                    <ElementRow key={i} index={i} />
                  ))}
                </tbody>
              </table>
            </div>
          </details>

          <div className={section} data-testid="source-table">
            <div className="flex items-center justify-between">
              <h3 className="text-sm font-semibold">Planned sources</h3>
              <button
                type="button"
                className="rounded-md px-2 py-1 text-xs font-medium ring-1 ring-ink-200 hover:bg-ink-50"
                onClick={() => dispatch({ type: 'addSource', bearingDeg: 0 })}
                disabled={readOnly || draft.plannedSources.length >= 32}
              >
                Add source
              </button>
            </div>
            {draft.plannedSources.length === 0 ? <p className="text-xs text-ink-500">None yet.</p> : null}
            {draft.plannedSources.map((_, i) => (
              <div key={i} className="grid grid-cols-[auto_1fr_1fr_auto] items-end gap-2">
                <span className="pb-2 text-xs font-medium text-ink-600">S{i + 1}</span>
                <NumberField name={`plannedSources.${i}.bearingDeg`} label="Bearing" unit="°" />
                <NumberField name={`plannedSources.${i}.snrDb`} label="SNR (blank: as above)" unit="dB" />
                <button
                  type="button"
                  className="mb-0.5 rounded-md px-2 py-1.5 text-xs text-coral-700 ring-1 ring-coral-500/40 hover:bg-coral-50"
                  onClick={() => dispatch({ type: 'removeSource', index: i })}
                  aria-label={`Remove source ${i + 1}`}
                >
                  Remove
                </button>
              </div>
            ))}
          </div>

          {onSave && !readOnly ? (
            <div className="flex items-center gap-3">
              <button
                type="submit"
                className="rounded-md bg-glass-600 px-3 py-1.5 text-sm font-medium text-white hover:bg-glass-700 disabled:bg-ink-300"
                disabled={saveState === 'saving'}
                data-testid="save-revision"
              >
                {saveState === 'saving' ? 'Saving…' : 'Save as new revision'}
              </button>
              <span role="status" className="text-xs text-ink-500">
                {saveState === 'saved' ? 'Saved.' : saveState === 'failed' ? 'Not saved: see the messages above.' : ''}
              </span>
              {formState.errors.root?.message ? (
                <span className="text-xs text-coral-600">{formState.errors.root.message}</span>
              ) : null}
            </div>
          ) : null}
        </fieldset>
      </form>
    </FormProvider>
  );
}

function ElementRow({ index }: { index: number }) {
  return (
    <tr className="border-t border-ink-100">
      <td className="py-1 pr-2 tabular text-ink-600">{index + 1}</td>
      <td className="py-1 pr-2">
        <EnabledBox index={index} />
      </td>
      <td className="py-1 pr-2">
        <NumberField
          name={`elementStates.${index}.gainDb`}
          label={`Gain of element ${index + 1}`}
          hideLabel
          testId={`field-gain-${index}`}
        />
      </td>
      <td className="py-1">
        <NumberField
          name={`elementStates.${index}.phaseDeg`}
          label={`Phase of element ${index + 1}`}
          hideLabel
          testId={`field-phase-${index}`}
        />
      </td>
    </tr>
  );
}

function EnabledBox({ index }: { index: number }) {
  const { register } = useFormContext<ArrayInputRaw>();
  return (
    <input
      type="checkbox"
      aria-label={`Element ${index + 1} enabled`}
      data-testid={`field-enabled-${index}`}
      className="h-4 w-4 accent-glass-600"
      {...register(`elementStates.${index}.enabled` as const)}
    />
  );
}
