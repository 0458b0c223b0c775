'use client';
import { ClientApiError } from '@/lib/client/fetcher';

/**
 * Turns a failed save into the designer's `serverErrors`: the API's 422
 * `fields` are keyed by dotted path (`spacing.value`, `elementStates.3.gainDb`),
 * the names the designer form uses; anything else goes to the form's root message.
 */
export function saveErrors(err: unknown): Record<string, string[]> {
  if (err instanceof ClientApiError) {
    if (err.status === 422 && err.fields && Object.keys(err.fields).length) return err.fields;
    return { _: [err.message] };
  }
  return { _: ['The server could not be reached; nothing was saved. Try again.'] };
}
