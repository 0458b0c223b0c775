'use client';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { Field, FormMessage } from '@/components/ui/field';
import { apiSend, ClientApiError } from '@/lib/client/fetcher';

export function ProfileForm({ name, email }: { name: string; email: string }) {
  const router = useRouter();
  const [fields, setFields] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null);
  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const data = new FormData(e.currentTarget);
    setFields({});
    try {
      await apiSend('PATCH', '/api/account', { name: data.get('profile-name') });
      setMessage({ tone: 'ok', text: 'Saved.' });
      router.refresh();
    } catch (err) {
      if (err instanceof ClientApiError && err.fields) setFields(err.fields);
      setMessage({ tone: 'error', text: (err as Error).message });
    }
  }
  return (
    <form onSubmit={onSubmit} className="space-y-4 px-5 py-4" noValidate>
      <Field
        id="profile-email"
        label="E-mail"
        value={email}
        readOnly
        disabled
        hint="Your sign-in address. Ask an admin to change it."
      />
      <Field id="profile-name" label="Name" defaultValue={name} required autoComplete="name" error={fields.name?.[0]} />
      {message ? <FormMessage tone={message.tone}>{message.text}</FormMessage> : null}
      <Button type="submit">Save profile</Button>
    </form>
  );
}
