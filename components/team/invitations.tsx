'use client';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { Field, FormMessage, inputClass } from '@/components/ui/field';
import { apiSend, ClientApiError } from '@/lib/client/fetcher';
import type { InvitationDto } from '@/lib/data/dto';
import { cn } from '@/lib/client/cn';

const tone = { pending: 'teal', accepted: 'ink', expired: 'amber', revoked: 'coral' } as const;

export function Invitations({ invitations }: { invitations: InvitationDto[] }) {
  const router = useRouter();
  const [fields, setFields] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null);
  const [busy, setBusy] = useState(false);

  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    const data = new FormData(form);
    setBusy(true);
    setFields({});
    setMessage(null);
    try {
      await apiSend('POST', '/api/team/invitations', {
        email: data.get('invite-email'),
        role: data.get('invite-role'),
      });
      setMessage({ tone: 'ok', text: `Invitation sent to ${String(data.get('invite-email'))}.` });
      form.reset();
      router.refresh();
    } catch (err) {
      if (err instanceof ClientApiError && err.fields) setFields(err.fields);
      setMessage({ tone: 'error', text: (err as Error).message });
    } finally {
      setBusy(false);
    }
  }

  async function revoke(id: number) {
    try {
      await apiSend('DELETE', `/api/team/invitations/${id}`);
      router.refresh();
    } catch (err) {
      setMessage({ tone: 'error', text: (err as Error).message });
    }
  }

  return (
    <div className="space-y-4 px-5 py-4">
      <form onSubmit={onSubmit} className="grid gap-3 sm:grid-cols-[1fr_10rem_auto] sm:items-end" noValidate>
        <Field
          id="invite-email"
          label="E-mail"
          type="email"
          required
          autoComplete="off"
          placeholder="colleague@example.org"
          error={fields.email?.[0]}
        />
        <div>
          <label htmlFor="invite-role" className="block text-sm font-medium text-ink-800">
            Role
          </label>
          <select
            id="invite-role"
            name="invite-role"
            defaultValue="engineer"
            className={cn(inputClass, 'mt-1')}
            aria-invalid={fields.role ? true : undefined}
          >
            <option value="engineer">engineer</option>
            <option value="reviewer">reviewer</option>
            <option value="viewer">viewer</option>
            <option value="admin">admin</option>
          </select>
        </div>
        <Button type="submit" disabled={busy}>
          {busy ? 'Sending…' : 'Send invitation'}
        </Button>
      </form>
      {message ? <FormMessage tone={message.tone}>{message.text}</FormMessage> : null}
      {invitations.length === 0 ? (
        <p className="text-sm text-ink-500">No invitations yet.</p>
      ) : (
        <ul className="divide-y divide-ink-100 rounded-md border border-ink-100">
          {invitations.map((i) => (
            <li key={i.id} className="flex flex-wrap items-center gap-3 px-3 py-2 text-sm">
              <span className="font-mono text-xs">{i.email}</span>
              <span className="text-ink-500">as {i.role}</span>
              <Badge tone={tone[i.status]}>{i.status}</Badge>
              <span className="text-xs text-ink-400 tabular">
                {i.status === 'pending'
                  ? `expires ${i.expiresAt.slice(0, 16).replace('T', ' ')} UTC`
                  : `sent ${i.createdAt.slice(0, 10)}`}
              </span>
              {i.status === 'pending' ? (
                <Button variant="ghost" className="ml-auto px-2 py-1 text-xs" onClick={() => revoke(i.id)}>
                  Revoke
                </Button>
              ) : null}
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
