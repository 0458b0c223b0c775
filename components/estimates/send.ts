'use client';
import { getCsrfToken } from 'next-auth/react';
import { ClientApiError } from '@/lib/client/fetcher';

/** A JSON write with extra headers (e.g. Prefer: respond-async) and the CSRF header. */
export async function apiSendWithHeaders<T>(
  method: 'POST' | 'DELETE',
  url: string,
  body: unknown,
  headers: Record<string, string> = {},
): Promise<T> {
  const token = await getCsrfToken();
  const res = await fetch(url, {
    method,
    headers: {
      'content-type': 'application/json',
      accept: 'application/json',
      ...(token ? { 'x-csrf-token': token } : {}),
      ...headers,
    },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  if (!res.ok) {
    let e: { code?: string; message?: string; fields?: Record<string, string[]> } = {};
    try {
      e = ((await res.json()) as { error?: typeof e }).error ?? {};
    } catch {
      /* not JSON */
    }
    throw new ClientApiError(res.status, e.code ?? 'error', e.message ?? `Request failed (${res.status})`, e.fields);
  }
  return (await res.json()) as T;
}
