'use client';
import { getCsrfToken } from 'next-auth/react';
import { ClientApiError } from '@/lib/client/fetcher';

/** A cookie-authenticated write with the CSRF header (JSON or multipart); throws ClientApiError with the server's message. */
export async function sendWithCsrf<T>(
  url: string,
  init: { method: 'POST'; json?: unknown; form?: FormData },
): Promise<T> {
  const token = await getCsrfToken();
  const headers: Record<string, string> = { accept: 'application/json', ...(token ? { 'x-csrf-token': token } : {}) };
  if (init.json !== undefined) headers['content-type'] = 'application/json';
  const res = await fetch(url, {
    method: init.method,
    headers,
    body: init.form ?? (init.json !== undefined ? JSON.stringify(init.json) : undefined),
  });
  if (!res.ok) {
    let body: { error?: { code?: string; message?: string; fields?: Record<string, string[]> } } = {};
    try {
      body = await res.json();
    } catch {
      /* not JSON */
    }
    throw new ClientApiError(
      res.status,
      body.error?.code ?? 'error',
      body.error?.message ?? `Request failed (${res.status})`,
      body.error?.fields,
    );
  }
  return (await res.json()) as T;
}
