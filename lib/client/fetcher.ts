'use client';
import { getCsrfToken } from 'next-auth/react';

/** The client-side twin of the server's error body: {error:{code,message,fields?}}. */
export class ClientApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields?: Record<string, string[]>,
  ) {
    super(message);
    this.name = 'ClientApiError';
  }
}

async function toError(res: Response): Promise<ClientApiError> {
  try {
    const body = (await res.json()) as {
      error?: { code?: string; message?: string; fields?: Record<string, string[]> };
    };
    return new ClientApiError(
      res.status,
      body.error?.code ?? 'error',
      body.error?.message ?? `Request failed (${res.status})`,
      body.error?.fields,
    );
  } catch {
    return new ClientApiError(res.status, 'error', `Request failed (${res.status})`);
  }
}

/** The one SWR fetcher: JSON on success, ClientApiError otherwise. */
export async function fetcher<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: 'application/json' } });
  if (!res.ok) throw await toError(res);
  return (await res.json()) as T;
}

let csrf: Promise<string | undefined> | undefined;

/**
 * Sends a write with the CSRF header that cookie-authenticated changes need:
 * a FormData body goes as multipart/form-data (file uploads), anything else as JSON.
 */
export async function apiSend<T>(
  method: 'POST' | 'PATCH' | 'PUT' | 'DELETE',
  url: string,
  body?: unknown,
  /** Extra request headers, e.g. `prefer: respond-async`. */
  extraHeaders: Record<string, string> = {},
): Promise<T> {
  csrf ??= getCsrfToken();
  const token = await csrf;
  const form = typeof FormData !== 'undefined' && body instanceof FormData;
  const res = await fetch(url, {
    method,
    headers: {
      ...(form ? {} : { 'content-type': 'application/json' }),
      accept: 'application/json',
      ...(token ? { 'x-csrf-token': token } : {}),
      ...extraHeaders,
    },
    body: body === undefined ? undefined : form ? (body as FormData) : JSON.stringify(body),
  });
  if (res.status === 403) csrf = undefined; // a stale token is fetched afresh next time
  if (!res.ok) throw await toError(res);
  return (res.status === 204 ? undefined : await res.json()) as T;
}
