'use client';
import Link from 'next/link';
import { useState } from 'react';
import { getCsrfToken } from 'next-auth/react';
import { Button } from '@/components/ui/button';
import { Field, FormMessage } from '@/components/ui/field';

/**
 * Posts to next-auth's credentials callback itself (rather than signIn()) so a
 * 429 from the sign-in rate limit can be shown as a clear message.
 */
export function LoginForm({ callbackUrl, initialError }: { callbackUrl: string; initialError?: string }) {
  const [error, setError] = useState<string | null>(initialError ?? null);
  const [busy, setBusy] = useState(false);

  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const data = new FormData(e.currentTarget);
    setBusy(true);
    setError(null);
    try {
      const csrfToken = (await getCsrfToken()) ?? '';
      const res = await fetch('/api/auth/callback/credentials', {
        method: 'POST',
        headers: { 'content-type': 'application/x-www-form-urlencoded', 'x-auth-return-redirect': '1' },
        body: new URLSearchParams({
          email: String(data.get('email') ?? ''),
          password: String(data.get('password') ?? ''),
          csrfToken,
          callbackUrl,
          json: 'true',
        }),
      });
      if (res.status === 429) {
        const body = (await res.json().catch(() => null)) as { error?: { message?: string } } | null;
        setError(body?.error?.message ?? 'Too many failed sign-in attempts. Wait a few minutes and try again.');
        return;
      }
      const body = (await res.json().catch(() => ({}))) as { url?: string };
      const url = body.url ? new URL(body.url, window.location.origin) : null;
      if (!res.ok || !url || url.searchParams.get('error')) {
        setError('That e-mail and password do not match an account. Check both, or reset your password.');
        return;
      }
      window.location.assign(callbackUrl);
    } catch {
      setError('Could not reach the server. Check your connection and try again.');
    } finally {
      setBusy(false);
    }
  }

  return (
    <form onSubmit={onSubmit} className="space-y-4" noValidate>
      <Field id="email" label="E-mail" type="email" autoComplete="username" required autoFocus />
      <Field id="password" label="Password" type="password" autoComplete="current-password" required />
      {error ? <FormMessage tone="error">{error}</FormMessage> : null}
      <Button type="submit" className="w-full py-2" disabled={busy}>
        {busy ? 'Signing in…' : 'Sign in'}
      </Button>
      <p className="text-center text-sm">
        <Link href="/reset" className="text-glass-700 underline-offset-2 hover:underline">
          Forgot your password?
        </Link>
      </p>
    </form>
  );
}
