'use client';
import { apiSend } from '@/lib/client/fetcher';

/** A JSON write with extra headers (e.g. Prefer: respond-async) and the CSRF header: lib/client apiSend. */
export function apiSendWithHeaders<T>(
  method: 'POST' | 'DELETE',
  url: string,
  body: unknown,
  headers: Record<string, string> = {},
): Promise<T> {
  return apiSend<T>(method, url, body, headers);
}
