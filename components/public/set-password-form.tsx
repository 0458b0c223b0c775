'use client';
import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { Field, FormMessage } from '@/components/ui/field';

/** Completes an invitation or a reset: POST /api/links/complete with the link token. */
export function SetPasswordForm({ token, purpose }: { token: string; purpose: 'invite' | 'reset' }) {
  const [fields, setFields] = useState<Record<string, string[]>>({});
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const data = new FormData(e.currentTarget);
    setFields({});
    setError(null);
    if (data.get('password') !== data.get('confirm')) {
      setFields({ confirm: ['The two passwords differ.'] });
      return;
    }
    setBusy(true);
    try {
      const res = await fetch('/api/links/complete', {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify({
          token,
          password: data.get('password'),
          ...(purpose === 'invite' ? { name: data.get('name') } : {}),
        }),
      });
      if (!res.ok) {
        const body = (await res.json().catch(() => null)) as {
          error?: { message?: string; fields?: Record<string, string[]> };
        } | null;
        setFields(body?.error?.fields ?? {});
        setError(body?.error?.message ?? 'The password could not be set.');
        return;
      }
      window.location.assign(`/login?done=${purpose}`);
    } finally {
      setBusy(false);
    }
  }

  return (
    <form onSubmit={onSubmit} className="space-y-4" noValidate>
      {purpose === 'invite' ? (
        <Field id="name" label="Your name" autoComplete="name" required error={fields.name?.[0]} />
      ) : null}
      <Field
        id="password"
        label="New password"
        type="password"
        autoComplete="new-password"
        required
        hint="At least 10 characters."
        error={fields.password?.[0]}
      />
      <Field
        id="confirm"
        label="New password again"
        type="password"
        autoComplete="new-password"
        required
        error={fields.confirm?.[0]}
      />
      {error ? <FormMessage tone="error">{error}</FormMessage> : null}
      <Button type="submit" className="w-full py-2" disabled={busy}>
        {purpose === 'invite' ? 'Join the team' : 'Set new password'}
      </Button>
    </form>
  );
}
