'use client';
import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { Field, FormMessage } from '@/components/ui/field';
import { apiSend, ClientApiError } from '@/lib/client/fetcher';

export function PasswordForm() {
  const [fields, setFields] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null);
  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    const data = new FormData(form);
    setFields({});
    if (data.get('new-password') !== data.get('confirm-password')) {
      setFields({ confirm: ['The two new passwords differ.'] });
      return;
    }
    try {
      await apiSend('POST', '/api/account/password', {
        currentPassword: data.get('current-password'),
        newPassword: data.get('new-password'),
      });
      setMessage({ tone: 'ok', text: 'Password changed.' });
      form.reset();
    } catch (err) {
      if (err instanceof ClientApiError && err.fields) setFields(err.fields);
      setMessage({ tone: 'error', text: (err as Error).message });
    }
  }
  return (
    <form onSubmit={onSubmit} className="space-y-4 px-5 py-4" noValidate>
      <Field
        id="current-password"
        label="Current password"
        type="password"
        autoComplete="current-password"
        required
        error={fields.currentPassword?.[0]}
      />
      <Field
        id="new-password"
        label="New password"
        type="password"
        autoComplete="new-password"
        required
        hint="At least 10 characters."
        error={fields.newPassword?.[0]}
      />
      <Field
        id="confirm-password"
        label="New password again"
        type="password"
        autoComplete="new-password"
        required
        error={fields.confirm?.[0]}
      />
      {message ? <FormMessage tone={message.tone}>{message.text}</FormMessage> : null}
      <Button type="submit">Change password</Button>
    </form>
  );
}
