'use client';
import type { FieldError, FieldErrors, FieldValues, Path, UseFormSetError } from 'react-hook-form';

/**
 * Puts a 422's `fields` ({"sources.bearingsDeg": ["…"], "_": ["…"]}) on the
 * react-hook-form inputs of the same names; "_" (the body as a whole) becomes
 * the form's root error.
 */
export function applyServerFields<T extends FieldValues>(
  setError: UseFormSetError<T>,
  fields: Record<string, string[]> | undefined,
): void {
  for (const [field, messages] of Object.entries(fields ?? {})) {
    if (messages.length)
      setError((field === '_' ? 'root.server' : field) as Path<T>, { type: 'server', message: messages.join(' ') });
  }
}

/**
 * The first error message at one of `paths` (dotted, as the schema names
 * them), or for a list the message of its first bad entry: `sweep.values`
 * also finds `sweep.values.2`. An object's children are not searched, so
 * `array` does not pick up `array.elements`.
 */
export function errorAt<T extends FieldValues>(errors: FieldErrors<T>, ...paths: string[]): string | undefined {
  for (const p of paths) {
    let node: unknown = errors;
    for (const key of p.split('.'))
      node = node && typeof node === 'object' ? (node as Record<string, unknown>)[key] : undefined;
    const message = messageOf(node);
    if (message) return message;
  }
  return undefined;
}

function messageOf(node: unknown): string | undefined {
  if (!node || typeof node !== 'object') return undefined;
  const own = (node as FieldError).message;
  if (typeof own === 'string' && own) return own;
  if (Array.isArray(node)) for (const entry of node) if (messageOf(entry)) return messageOf(entry);
  return undefined;
}
