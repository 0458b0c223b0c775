/**
 * Array input: one zod schema for the designer form and the v1 arrays route
 * (docs/conventions.md §7: `{name, elements, spacing:{value, unit}, frequencyHz?,
 * propagationSpeedMps?}`), extended with the designer's optional fields.
 *
 * Every message names the field it is about (dotted path), because the API
 * flattens nested paths to their top-level key when it answers 422.
 *
 * A spacing in metres or millimetres needs frequencyHz and a speed: either
 * propagationSpeedMps, or a medium the speed is computed from.
 *
 * `resolveArrayGeometry` turns a valid input into the spacing in wavelengths
 * the engine works in (docs/conventions.md §1), using lib/doa/medium.ts for the speed.
 */
import { z } from 'zod';
import { propagationSpeed, type Medium } from '@/lib/doa/design/medium';
import { parseQuantity, quantitySchema } from '@/lib/units/quantity';

/** Element-count limits of the designer and the arrays API. */
export const MIN_ELEMENTS = 2;
export const MAX_ELEMENTS = 512;

const finite = (field: string) =>
  z
    .number({ error: (iss) => (iss.input === undefined ? `${field} is required` : `${field} must be a number`) })
    .refine(Number.isFinite, {
      error: `${field} must be a finite number`,
    });

const temperature = (field: string) =>
  finite(field).refine((v) => v > -273.15 && v <= 1000, { error: `${field} must lie between −273.15 °C and 1000 °C` });

export const mediumSchema = z.discriminatedUnion(
  'kind',
  [
    z.object({ kind: z.literal('radio') }),
    z.object({
      kind: z.literal('sea-water'),
      temperatureC: temperature('medium.temperatureC'),
      salinityPpt: finite('medium.salinityPpt').refine((v) => v >= 0 && v <= 60, {
        error: 'medium.salinityPpt must lie between 0 and 60 ppt',
      }),
      depthM: quantitySchema('length', { field: 'medium.depthM', min: 0, max: 11000 }),
      equation: z.enum(['mackenzie-1981', 'unesco-1983'], {
        error: 'medium.equation must be mackenzie-1981 or unesco-1983',
      }),
    }),
    z.object({ kind: z.literal('fresh-water'), temperatureC: temperature('medium.temperatureC') }),
    z.object({ kind: z.literal('air'), temperatureC: temperature('medium.temperatureC') }),
    z.object({
      kind: z.literal('custom'),
      speedMps: quantitySchema('speed', { field: 'medium.speedMps', positive: true, max: 1e9 }),
    }),
  ],
  { error: 'medium.kind must be radio, sea-water, fresh-water, air or custom' },
);

export const taperSchema = z.discriminatedUnion(
  'kind',
  [
    z.object({ kind: z.literal('uniform') }),
    z.object({ kind: z.literal('hann') }),
    z.object({ kind: z.literal('hamming') }),
    z.object({
      kind: z.literal('chebyshev'),
      sidelobeDb: finite('taper.sidelobeDb').refine((v) => v >= 10 && v <= 120, {
        error: 'taper.sidelobeDb must lie between 10 and 120 dB',
      }),
    }),
  ],
  { error: 'taper.kind must be uniform, hann, hamming or chebyshev' },
);

export const elementStateSchema = z.object({
  enabled: z.boolean({ error: 'elementStates[].enabled must be true or false' }),
  gainDb: finite('elementStates[].gainDb').refine((v) => Math.abs(v) <= 60, {
    error: 'elementStates[].gainDb must lie within ±60 dB',
  }),
  phaseDeg: finite('elementStates[].phaseDeg').refine((v) => Math.abs(v) <= 360, {
    error: 'elementStates[].phaseDeg must lie within ±360°',
  }),
});

const bearing = (field: string) =>
  finite(field).refine((v) => v >= -90 && v <= 90, {
    error: `${field} must lie between −90° and 90° (from broadside)`,
  });

export const plannedSourceSchema = z.object({
  bearingDeg: bearing('plannedSources[].bearingDeg'),
  snrDb: finite('plannedSources[].snrDb')
    .refine((v) => v >= -60 && v <= 100, { error: 'plannedSources[].snrDb must lie between −60 and 100 dB' })
    .optional(),
});

export const spacingUnits = ['wavelength', 'm', 'mm'] as const;
export type SpacingUnit = (typeof spacingUnits)[number];

const SPACING_MAX = 1e6;

/**
 * The spacing `{value, unit}`. A number (or a unitless expression) is in `unit`. A text with units
 * says its own unit: a length (`12.5 mm`, `0.0125 m`) is kept in millimetres when `unit` is mm and
 * in metres otherwise; a spacing in wavelengths (`0.5 lambda`, `0.5 λ`) becomes unit wavelength.
 */
export const spacingSchema = z
  .object(
    {
      value: z.union([z.number(), z.string()], {
        error: 'spacing.value is required: a number in spacing.unit, or a length such as "12.5 mm" or "0.5 lambda"',
      }),
      unit: z.enum(spacingUnits, { error: 'spacing.unit must be wavelength, m or mm' }),
    },
    { error: 'spacing must be an object {value, unit}' },
  )
  .transform((v, ctx) => {
    const refuse = (message: string) => {
      ctx.addIssue({ code: 'custom', path: ['value'], message });
      return z.NEVER;
    };
    let value: number;
    let unit: SpacingUnit = v.unit;
    try {
      const q = parseQuantity(v.value, 'length', { allowWavelength: true });
      if (q.unit === 'wavelength') [value, unit] = [q.value, 'wavelength'];
      else if (!q.withUnit) value = q.value;
      else if (v.unit === 'mm') value = q.value * 1000;
      else [value, unit] = [q.value, 'm'];
    } catch (err) {
      return refuse(`spacing.value: ${(err as Error).message}`);
    }
    if (!(value > 0)) return refuse('spacing.value must be greater than 0');
    if (value > SPACING_MAX) return refuse(`spacing.value is too large (at most ${SPACING_MAX})`);
    return { value, unit };
  });

export const arrayInputSchema = z
  .object({
    name: z
      .string({ error: 'name is required' })
      .trim()
      .min(1, { error: 'name must not be empty' })
      .max(120, { error: 'name must be at most 120 characters' }),
    elements: z
      .number({ error: 'elements must be a whole number' })
      .refine(Number.isFinite, { error: 'elements must be a finite whole number' })
      .refine(Number.isInteger, { error: 'elements must be a whole number' })
      .refine((v) => v >= MIN_ELEMENTS, {
        error: `elements must be at least ${MIN_ELEMENTS}: a single element has no aperture`,
      })
      .refine((v) => v <= MAX_ELEMENTS, {
        error: (iss) =>
          `elements must be at most ${MAX_ELEMENTS}; ${String(iss.input)} is more than the designer supports`,
      }),
    spacing: spacingSchema,
    frequencyHz: quantitySchema('frequency', { field: 'frequencyHz', positive: true }).optional(),
    propagationSpeedMps: quantitySchema('speed', { field: 'propagationSpeedMps', positive: true }).optional(),
    medium: mediumSchema.optional(),
    steerDeg: bearing('steerDeg').optional(),
    scanSectorDeg: finite('scanSectorDeg')
      .refine((v) => v >= 0 && v <= 90, {
        error: 'scanSectorDeg (half-width of the scan sector) must lie between 0° and 90°',
      })
      .optional(),
    taper: taperSchema.optional(),
    elementStates: z.array(elementStateSchema, { error: 'elementStates must be a list' }).optional(),
    plannedSources: z
      .array(plannedSourceSchema, { error: 'plannedSources must be a list' })
      .max(32, { error: 'plannedSources: at most 32 planned sources' })
      .optional(),
    snapshots: z
      .number({ error: 'snapshots must be a whole number' })
      .refine(Number.isInteger, { error: 'snapshots must be a whole number' })
      .refine((v) => v >= 1 && v <= 1e7, { error: 'snapshots must lie between 1 and 10 000 000' })
      .optional(),
    snrDb: finite('snrDb')
      .refine((v) => v >= -60 && v <= 100, { error: 'snrDb must lie between −60 and 100 dB' })
      .optional(),
  })
  .superRefine((v, ctx) => {
    if (v.spacing.unit !== 'wavelength') {
      const unitName = v.spacing.unit === 'm' ? 'metres' : 'millimetres';
      if (v.frequencyHz === undefined) {
        ctx.addIssue({
          code: 'custom',
          path: ['frequencyHz'],
          message: `frequencyHz is required when the spacing is given in ${unitName}`,
        });
      }
      if (v.propagationSpeedMps === undefined && v.medium === undefined) {
        ctx.addIssue({
          code: 'custom',
          path: ['propagationSpeedMps'],
          message: `propagationSpeedMps (or a medium) is required when the spacing is given in ${unitName}`,
        });
      }
    }
    if (v.elementStates !== undefined && v.elementStates.length !== v.elements) {
      ctx.addIssue({
        code: 'custom',
        path: ['elementStates'],
        message: `elementStates has ${v.elementStates.length} entries but elements is ${v.elements}; they must match`,
      });
    }
    if (
      v.elementStates !== undefined &&
      v.elementStates.length === v.elements &&
      !v.elementStates.some((e) => e.enabled)
    ) {
      ctx.addIssue({
        code: 'custom',
        path: ['elementStates'],
        message: 'elementStates: at least one element must stay enabled',
      });
    }
  });

export type ArrayInput = z.infer<typeof arrayInputSchema>;
export type ArrayInputRaw = z.input<typeof arrayInputSchema>;
export type MediumInput = z.infer<typeof mediumSchema>;
export type TaperInput = z.infer<typeof taperSchema>;
export type ElementState = z.infer<typeof elementStateSchema>;
export type PlannedSource = z.infer<typeof plannedSourceSchema>;

/** The medium as lib/doa/medium.ts describes it (salinity in ppt is taken as psu). */
export function toEngineMedium(medium: MediumInput): Medium {
  switch (medium.kind) {
    case 'radio':
      return { kind: 'radio' };
    case 'sea-water':
      return medium.equation === 'unesco-1983'
        ? {
            kind: 'sea-water',
            equation: 'unesco',
            temperatureC: medium.temperatureC,
            salinityPsu: medium.salinityPpt,
            depthM: medium.depthM,
          }
        : {
            kind: 'sea-water',
            equation: 'mackenzie',
            temperatureC: medium.temperatureC,
            salinityPsu: medium.salinityPpt,
            depthM: medium.depthM,
          };
    case 'fresh-water':
      return { kind: 'fresh-water', temperatureC: medium.temperatureC };
    case 'air':
      return { kind: 'air', temperatureC: medium.temperatureC };
    case 'custom':
      return { kind: 'custom', speedMps: medium.speedMps };
  }
}

export interface GeometryWarning {
  code: 'outside-validity-range' | 'speed-differs-from-medium' | 'no-frequency';
  field: string;
  message: string;
}

export interface ResolvedGeometry {
  spacingWavelengths: number;
  /** λ in metres, when a frequency and a speed are known. */
  wavelengthM?: number;
  /** Propagation speed in m/s: propagationSpeedMps if given, else the medium's. */
  speedMps?: number;
  /** The published formula behind the speed, when it came from the medium. */
  speedFormula?: string;
  warnings: GeometryWarning[];
}

/**
 * Spacing in wavelengths (and λ, speed) from a validated input.
 * The speed is `propagationSpeedMps` when given, otherwise the medium's speed;
 * when both are present and differ by more than 1e−9 relative, the given speed
 * is used and a warning says so. Throws only if the input skipped validation.
 */
export function resolveArrayGeometry(input: ArrayInput): ResolvedGeometry {
  const warnings: GeometryWarning[] = [];
  let speedMps = input.propagationSpeedMps;
  let speedFormula: string | undefined;
  if (input.medium) {
    const medium = propagationSpeed(toEngineMedium(input.medium));
    speedFormula = medium.formula;
    for (const w of medium.warnings) {
      const field = w.field === 'salinityPsu' ? 'medium.salinityPpt' : `medium.${w.field}`;
      warnings.push({ code: 'outside-validity-range', field, message: w.message.replace('salinityPsu', 'salinity') });
    }
    if (speedMps === undefined) speedMps = medium.speedMps;
    else if (Math.abs(speedMps - medium.speedMps) > 1e-9 * medium.speedMps) {
      warnings.push({
        code: 'speed-differs-from-medium',
        field: 'propagationSpeedMps',
        message: `propagationSpeedMps ${speedMps} m/s differs from the medium's ${medium.speedMps.toFixed(3)} m/s (${medium.formula}); the given speed is used`,
      });
      speedFormula = undefined;
    }
  }
  const wavelengthM =
    input.frequencyHz !== undefined && speedMps !== undefined ? speedMps / input.frequencyHz : undefined;
  let spacingWavelengths: number;
  if (input.spacing.unit === 'wavelength') {
    spacingWavelengths = input.spacing.value;
  } else {
    if (wavelengthM === undefined) {
      throw new RangeError(
        `spacing in ${input.spacing.unit} needs frequencyHz and propagationSpeedMps (validate with arrayInputSchema first)`,
      );
    }
    const metres = input.spacing.unit === 'm' ? input.spacing.value : input.spacing.value / 1000;
    spacingWavelengths = metres / wavelengthM;
  }
  if (input.frequencyHz === undefined && input.spacing.unit === 'wavelength') {
    warnings.push({
      code: 'no-frequency',
      field: 'frequencyHz',
      message: 'no analysis frequency: the spacing is known only in wavelengths',
    });
  }
  return { spacingWavelengths, wavelengthM, speedMps, speedFormula, warnings };
}

/** Spacing in the input's unit from a spacing in wavelengths (inverse of resolveArrayGeometry). */
export function spacingInUnit(spacingWavelengths: number, unit: SpacingUnit, wavelengthM: number | undefined): number {
  if (unit === 'wavelength') return spacingWavelengths;
  if (wavelengthM === undefined) throw new RangeError(`spacing in ${unit} needs a wavelength`);
  const metres = spacingWavelengths * wavelengthM;
  return unit === 'm' ? metres : metres * 1000;
}
