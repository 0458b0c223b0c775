/**
 * Physical quantities typed by people: a plain number in the documented unit, a value with a unit
 * (`12.5 mm`, `3 kHz`, `0.5 lambda`) or an expression (`1500/(2*3000) m`), parsed by mathjs.
 *
 * One zod schema per quantity kind serves both the forms and the route handlers: the handler keeps
 * accepting a plain number in the documented unit, and a string is converted to that unit.
 * `lambda` (also `wavelength`, `wavelengths`, `λ`) is a unit of its own for spacings given in
 * wavelengths; it converts to metres only when the caller knows the wavelength.
 */
import { all, create, type Unit } from 'mathjs';
import { z } from 'zod';

const math = create(all, {});
math.createUnit('lambda', { aliases: ['wavelength', 'wavelengths', 'λ'] });
// Unit-bearing evaluation only: no assignment, no function definitions, no imports.
const evaluateExpression = math.evaluate;
math.import(
  {
    import: () => {
      throw new Error('import is disabled');
    },
    createUnit: () => {
      throw new Error('createUnit is disabled');
    },
  },
  { override: true },
);

/**
 * People read `1500/(2*3000) m` as "(1500/(2*3000)) metres", while mathjs binds the implicit
 * multiplication `(2*3000) m` first. When the text is a unitless expression followed by a unit,
 * wrap the expression in brackets so it reads the way people mean it.
 */
function withTrailingUnit(text: string): string {
  const m = /^(.*\S)\s+([A-Za-zλµ°][A-Za-zλµ°/^0-9]*)$/.exec(text);
  if (!m) return text;
  try {
    const head = evaluateExpression(m[1]);
    if (typeof head === 'number') return `(${m[1]}) ${m[2]}`;
  } catch {
    // not a plain expression before the unit: leave the text as it is
  }
  return text;
}

/** Expression nodes a quantity may not contain: assignments, function definitions, several statements. */
const REFUSED_NODES = new Set(['AssignmentNode', 'FunctionAssignmentNode', 'BlockNode']);

/**
 * Evaluate a typed quantity. `λ` is read as `lambda`. A plain "number unit" (`2 min`, `12.5 mm`)
 * is read as a unit first, so unit names that are also functions (min, max) mean the unit; anything
 * else is an expression, refused if it assigns or defines anything.
 */
function evaluateQuantityText(raw: string): unknown {
  const text = raw.replace(/λ/g, ' lambda ').replace(/\s+/g, ' ').trim();
  if (/^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*[A-Za-zµ°][A-Za-zµ°/^0-9 ]*$/.test(text)) {
    try {
      return math.unit(text);
    } catch {
      // not a single unit: read it as an expression below
    }
  }
  const prepared = withTrailingUnit(text);
  math.parse(prepared).traverse((node) => {
    if (REFUSED_NODES.has(node.type)) throw new Error('only a value or an expression is allowed, not an assignment');
  });
  return evaluateExpression(prepared);
}

export type QuantityKind = 'length' | 'frequency' | 'time' | 'speed' | 'angle';

/** The SI unit a plain number means for each kind, and a probe unit of that dimension. */
export const QUANTITY_UNITS: Record<QuantityKind, { unit: string; example: string }> = {
  length: { unit: 'm', example: '12.5 mm' },
  frequency: { unit: 'Hz', example: '3 kHz' },
  time: { unit: 's', example: '250 ms' },
  speed: { unit: 'm/s', example: '1500 m/s' },
  angle: { unit: 'deg', example: '3 deg' },
};

/** The value in `unit`; `withUnit` tells whether the input named a unit (false for plain numbers and unitless expressions). */
export type ParsedQuantity = { value: number; unit: string; withUnit: boolean };

export class QuantityError extends Error {}

/**
 * Parse `input` as a quantity of `kind`. Plain numbers (and unitless expressions) are taken in the
 * kind's documented unit. With `allowWavelength`, a length may also be given in `lambda`; the
 * result then has unit `wavelength` unless `wavelengthM` is known, when it is converted to metres.
 */
export function parseQuantity(
  input: string | number,
  kind: QuantityKind,
  options: { allowWavelength?: boolean; wavelengthM?: number } = {},
): ParsedQuantity {
  const { unit } = QUANTITY_UNITS[kind];
  if (typeof input === 'number') {
    if (!Number.isFinite(input)) throw new QuantityError(`expected a finite number in ${unit}`);
    return { value: input, unit, withUnit: false };
  }
  const text = input.trim();
  if (text === '') throw new QuantityError(`expected a ${kind} such as ${QUANTITY_UNITS[kind].example}`);
  if (text.length > 200) throw new QuantityError('expression is longer than 200 characters');
  let result: unknown;
  try {
    result = evaluateQuantityText(text);
  } catch (err) {
    throw new QuantityError(`could not read "${text}" as a ${kind} (${(err as Error).message})`);
  }
  if (typeof result === 'number') {
    if (!Number.isFinite(result)) throw new QuantityError(`"${text}" is not a finite number`);
    return { value: result, unit, withUnit: false };
  }
  if (!math.isUnit(result)) throw new QuantityError(`"${text}" is not a ${kind}`);
  const u = result as Unit;
  if (options.allowWavelength && u.equalBase(math.unit('1 lambda'))) {
    const wavelengths = u.toNumber('lambda');
    if (!Number.isFinite(wavelengths)) throw new QuantityError(`"${text}" is not a finite number`);
    if (options.wavelengthM !== undefined) return { value: wavelengths * options.wavelengthM, unit, withUnit: true };
    return { value: wavelengths, unit: 'wavelength', withUnit: true };
  }
  const probe = kind === 'angle' ? math.unit('1 deg') : math.unit(`1 ${unit}`);
  if (!u.equalBase(probe)) {
    const lambdaNote = options.allowWavelength ? ' or wavelengths (lambda)' : '';
    throw new QuantityError(
      `"${text}" is not a ${kind}: expected units of ${unit}${lambdaNote}, e.g. ${QUANTITY_UNITS[kind].example}`,
    );
  }
  const value = u.toNumber(unit);
  if (!Number.isFinite(value)) throw new QuantityError(`"${text}" is not a finite number`);
  return { value, unit, withUnit: true };
}

/** Bounds of a quantity, in the kind's documented unit. */
export interface QuantityBounds {
  min?: number;
  max?: number;
  positive?: boolean;
  /** The field's name, put at the start of every refusal (`frequencyHz: …`). */
  field?: string;
}

/** The refusal for a value outside its bounds, or null. */
export function quantityBoundsError(v: number, kind: QuantityKind, bounds: QuantityBounds): string | null {
  const { unit } = QUANTITY_UNITS[kind];
  const name = bounds.field ?? 'the value';
  if (bounds.positive && !(v > 0)) return `${name} must be greater than 0 ${unit}`;
  if (bounds.min !== undefined && v < bounds.min) return `${name} must be at least ${bounds.min} ${unit}`;
  if (bounds.max !== undefined && v > bounds.max) return `${name} must be at most ${bounds.max} ${unit}`;
  return null;
}

/**
 * A zod schema for a quantity: accepts a number (in the kind's documented unit) or a string with
 * units or an expression, and yields the number in the documented unit. A refusal names the field
 * (when `bounds.field` is given) and says what was expected; zod puts it under the field's path.
 */
export function quantitySchema(kind: QuantityKind, bounds: QuantityBounds = {}) {
  const { unit, example } = QUANTITY_UNITS[kind];
  const prefix = bounds.field ? `${bounds.field}: ` : '';
  return z
    .union([z.number(), z.string()], {
      error: `${prefix}expected a ${kind} as a number in ${unit} or a text such as "${example}"`,
    })
    .transform((input, ctx) => {
      let parsed: ParsedQuantity;
      try {
        parsed = parseQuantity(input, kind);
      } catch (err) {
        ctx.addIssue({ code: 'custom', message: `${prefix}${(err as Error).message}` });
        return z.NEVER;
      }
      const refusal = quantityBoundsError(parsed.value, kind, bounds);
      if (refusal) ctx.addIssue({ code: 'custom', message: refusal });
      return parsed.value;
    });
}
