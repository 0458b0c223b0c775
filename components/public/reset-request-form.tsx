'use client';
import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { Field, FormMessage } from '@/components/ui/field';

export function ResetRequestForm() {
  const [state, setState] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null);
  const [fieldError, setFieldError] = useState<string | undefined>();
  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const email = new FormData(e.currentTarget).get('email');
    setFieldError(undefined);
    const res = await fetch('/api/password-reset', {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ email }),
    });
    const body = (await res.json().catch(() => null)) as {
      message?: string;
      error?: { message?: string; fields?: Record<string, string[]> };
    } | null;
    if (res.ok)
      setState({ tone: 'ok', text: body?.message ?? 'If that address has an account, a reset link is on its way.' });
    else {
      setFieldError(body?.error?.fields?.email?.[0]);
      setState({ tone: 'error', text: body?.error?.message ?? 'The request failed.' });
    }
  }
  return (
    <form onSubmit={onSubmit} className="space-y-4" noValidate>
      <Field id="email" label="E-mail" type="email" autoComplete="username" required error={fieldError} />
      {state ? <FormMessage tone={state.tone}>{state.text}</FormMessage> : null}
      <Button type="submit" className="w-full py-2">
        Send reset link
      </Button>
    </form>
  );
}
