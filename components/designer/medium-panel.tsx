'use client';

/**
 * Propagation medium, analysis frequency, and the live wavelength and spacing
 * in λ. Lives inside the designer form (useFormContext); the numbers shown
 * come from resolveArrayGeometry on the current design.
 */
import { useFormContext, useWatch } from 'react-hook-form';
import type { ArrayInputRaw, MediumInput } from '@/lib/validations/array';
import type { ResolvedGeometry } from '@/lib/validations/array';
import { cn } from '@/lib/client/cn';
import { FieldError } from '@/components/ui/field';

export interface MediumPanelProps {
  geometry: ResolvedGeometry;
  readOnly?: boolean;
}

export const mediumDefaults: Record<MediumInput['kind'], MediumInput> = {
  radio: { kind: 'radio' },
  'sea-water': { kind: 'sea-water', temperatureC: 10, salinityPpt: 35, depthM: 50, equation: 'mackenzie-1981' },
  'fresh-water': { kind: 'fresh-water', temperatureC: 15 },
  air: { kind: 'air', temperatureC: 20 },
  custom: { kind: 'custom', speedMps: 1500 },
};

const num = (v: unknown) => (v === '' || v === null || v === undefined ? undefined : Number(v));

const PLAIN_NUMBER = /^\s*[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*$/;
/** A quantity field's text: a plain number becomes a number; text with units stays text for the schema. */
const quantityText = (v: unknown) =>
  v === '' || v === null || v === undefined
    ? undefined
    : typeof v === 'string' && !PLAIN_NUMBER.test(v)
      ? v.trim()
      : Number(v);

export function formatLength(m: number): string {
  if (m >= 1) return `${m.toFixed(4)} m`;
  if (m >= 1e-3) return `${(m * 1000).toFixed(3)} mm`;
  return `${(m * 1e6).toFixed(2)} µm`;
}

export function NumberField({
  name,
  label,
  unit,
  step = 'any',
  readOnly,
  testId,
  hideLabel,
  quantity,
}: {
  name: string;
  label: string;
  unit?: string;
  step?: string;
  readOnly?: boolean;
  testId?: string;
  hideLabel?: boolean;
  /**
   * Accept units and expressions (`3 kHz`, `12.5 mm`, `1500/(2*3000) m`), converted by the shared
   * schema; the example is the placeholder. The value goes to the design when the field is left
   * (the form listens to blur), not on every keystroke, so a half-typed unit is not taken early.
   */
  quantity?: { example: string };
}) {
  const { register, getFieldState, formState } = useFormContext<ArrayInputRaw>();
  const error = (getFieldState(name as never, formState).error as { message?: string } | undefined)?.message;
  const id = `f-${name.replace(/[^a-zA-Z0-9]+/g, '-')}`;
  const field = register(name as never, { setValueAs: quantity ? quantityText : num });
  return (
    <div>
      <label htmlFor={id} className={hideLabel ? 'sr-only' : 'block text-xs font-medium text-ink-700'}>
        {label}
        {unit ? <span className="font-normal text-ink-500"> ({unit})</span> : null}
      </label>
      <input
        id={id}
        type={quantity ? 'text' : 'number'}
        step={quantity ? undefined : step}
        inputMode={quantity ? 'text' : 'decimal'}
        placeholder={quantity ? `e.g. ${quantity.example}` : undefined}
        spellCheck={quantity ? false : undefined}
        readOnly={readOnly}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : undefined}
        data-testid={testId ?? `field-${name}`}
        className={cn(
          'block w-full rounded-md border bg-white px-2 py-1.5 text-sm tabular disabled:bg-ink-50 disabled:text-ink-500',
          hideLabel ? '' : 'mt-1',
          error ? 'border-coral-500' : 'border-ink-200',
        )}
        {...field}
        onChange={
          quantity
            ? (e) => {
                e.stopPropagation();
                return field.onChange(e);
              }
            : field.onChange
        }
      />
      <FieldError id={id} error={error} />
    </div>
  );
}

export function MediumPanel({ geometry, readOnly = false }: MediumPanelProps) {
  const { setValue, control } = useFormContext<ArrayInputRaw>();
  const medium = useWatch({ control, name: 'medium' }) as MediumInput | undefined;
  const kind = medium?.kind ?? 'radio';
  const spacingUnit = useWatch({ control, name: 'spacing.unit' });

  return (
    <fieldset className="space-y-3" data-testid="medium-panel">
      <legend className="text-sm font-semibold">Medium and wavelength</legend>
      <div className="grid grid-cols-2 gap-3">
        <div>
          <label htmlFor="f-medium-kind" className="block text-xs font-medium text-ink-700">
            Medium
          </label>
          <select
            id="f-medium-kind"
            value={kind}
            disabled={readOnly}
            data-testid="medium-kind"
            onChange={(e) =>
              setValue('medium', mediumDefaults[e.target.value as MediumInput['kind']], {
                shouldValidate: true,
                shouldDirty: true,
              })
            }
            className="mt-1 block w-full rounded-md border border-ink-200 bg-white px-2 py-1.5 text-sm"
          >
            <option value="radio">Radio (speed of light)</option>
            <option value="sea-water">Sea water</option>
            <option value="fresh-water">Fresh water</option>
            <option value="air">Air</option>
            <option value="custom">Custom speed</option>
          </select>
        </div>
        <NumberField
          name="frequencyHz"
          label="Analysis frequency"
          unit="Hz"
          readOnly={readOnly}
          quantity={{ example: '3 kHz' }}
        />
        {kind === 'sea-water' ? (
          <>
            <NumberField name="medium.temperatureC" label="Temperature" unit="°C" readOnly={readOnly} />
            <NumberField name="medium.salinityPpt" label="Salinity" unit="ppt" readOnly={readOnly} />
            <NumberField
              name="medium.depthM"
              label="Depth"
              unit="m"
              readOnly={readOnly}
              quantity={{ example: '0.2 km' }}
            />
            <div>
              <label htmlFor="f-medium-equation" className="block text-xs font-medium text-ink-700">
                Equation
              </label>
              <select
                id="f-medium-equation"
                disabled={readOnly}
                value={medium && medium.kind === 'sea-water' ? medium.equation : 'mackenzie-1981'}
                onChange={(e) =>
                  setValue('medium.equation' as never, e.target.value as never, {
                    shouldValidate: true,
                    shouldDirty: true,
                  })
                }
                className="mt-1 block w-full rounded-md border border-ink-200 bg-white px-2 py-1.5 text-sm"
              >
                <option value="mackenzie-1981">Mackenzie (1981)</option>
                <option value="unesco-1983">UNESCO (Chen &amp; Millero; Fofonoff &amp; Millard 1983)</option>
              </select>
            </div>
          </>
        ) : null}
        {kind === 'fresh-water' || kind === 'air' ? (
          <NumberField name="medium.temperatureC" label="Temperature" unit="°C" readOnly={readOnly} />
        ) : null}
        {kind === 'custom' ? (
          <NumberField
            name="medium.speedMps"
            label="Speed"
            unit="m/s"
            readOnly={readOnly}
            quantity={{ example: '1.5 km/s' }}
          />
        ) : null}
      </div>
      <dl className="grid grid-cols-3 gap-2 rounded-md bg-paper px-3 py-2 text-sm" aria-live="polite">
        <div>
          <dt className="text-2xs text-ink-500">Speed</dt>
          <dd className="font-mono tabular" data-testid="live-speed" data-value={geometry.speedMps ?? ''}>
            {geometry.speedMps !== undefined
              ? `${geometry.speedMps.toFixed(geometry.speedMps > 1e6 ? 0 : 3)} m/s`
              : '—'}
          </dd>
        </div>
        <div>
          <dt className="text-2xs text-ink-500">Wavelength λ</dt>
          <dd className="font-mono tabular" data-testid="live-wavelength" data-value={geometry.wavelengthM ?? ''}>
            {geometry.wavelengthM !== undefined ? formatLength(geometry.wavelengthM) : 'needs a frequency'}
          </dd>
        </div>
        <div>
          <dt className="text-2xs text-ink-500">Spacing</dt>
          <dd
            className="font-mono tabular"
            data-testid="live-spacing-wavelengths"
            data-value={geometry.spacingWavelengths}
          >
            {geometry.spacingWavelengths.toFixed(4)} λ
            {geometry.wavelengthM !== undefined && spacingUnit === 'wavelength' ? (
              <span className="block text-2xs text-ink-500">
                {formatLength(geometry.spacingWavelengths * geometry.wavelengthM)}
              </span>
            ) : null}
          </dd>
        </div>
      </dl>
      {geometry.speedFormula ? <p className="text-2xs text-ink-500">Speed from {geometry.speedFormula}.</p> : null}
      {geometry.warnings
        .filter((w) => w.code !== 'no-frequency')
        .map((w) => (
          <p
            key={w.field + w.code}
            role="status"
            className="rounded-md border border-amber-300 bg-amber-50 px-2 py-1 text-xs text-amber-700"
          >
            {w.message}
          </p>
        ))}
    </fieldset>
  );
}
