'use client';
import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { Badge } from '@/components/ui/badge';
import { Field, FormMessage } from '@/components/ui/field';
import { apiSend, ClientApiError } from '@/lib/client/fetcher';
import { useApi } from '@/lib/client/use-api';
import type { TokenDto } from '@/lib/data/dto';

export function Tokens({ initial }: { initial: TokenDto[] }) {
  const { data, mutate } = useApi<{ items: TokenDto[] }>('/api/account/tokens', { items: initial });
  const [created, setCreated] = useState<string | null>(null);
  const [fields, setFields] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<string | null>(null);

  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    const name = new FormData(form).get('token-name');
    setFields({});
    setMessage(null);
    try {
      const res = await apiSend<{ token: string }>('POST', '/api/account/tokens', { name });
      setCreated(res.token);
      form.reset();
      await mutate();
    } catch (err) {
      if (err instanceof ClientApiError && err.fields) setFields(err.fields);
      setMessage((err as Error).message);
    }
  }

  async function revoke(t: TokenDto) {
    if (!window.confirm(`Revoke "${t.name}"? Anything using it stops working.`)) return;
    try {
      await apiSend('DELETE', `/api/account/tokens/${t.id}`);
      await mutate();
    } catch (err) {
      setMessage((err as Error).message);
    }
  }

  const items = data?.items ?? [];
  return (
    <div className="space-y-4 px-5 py-4">
      <form onSubmit={onSubmit} className="flex flex-wrap items-end gap-3" noValidate>
        <Field
          id="token-name"
          label="Token name"
          placeholder="e.g. survey laptop"
          className="min-w-56 flex-1"
          error={fields.name?.[0]}
        />
        <Button type="submit">Create token</Button>
      </form>
      {message ? <FormMessage tone="error">{message}</FormMessage> : null}
      {created ? (
        <div role="status" className="rounded-md border border-glass-200 bg-glass-50 px-4 py-3 text-sm">
          <p className="font-medium text-glass-800">Copy this token now. It will not be shown again.</p>
          <code
            data-testid="new-token"
            className="mt-2 block overflow-x-auto rounded bg-white px-2 py-1.5 font-mono text-xs select-all"
          >
            {created}
          </code>
          <p className="mt-2 text-xs text-ink-600">
            Send it as <code className="font-mono">Authorization: Bearer &lt;token&gt;</code>. It acts with your role in
            your team.
          </p>
        </div>
      ) : null}
      {items.length === 0 ? (
        <p className="text-sm text-ink-500">No tokens yet. Tokens let scripts call the API as you.</p>
      ) : (
        <table className="w-full text-left text-sm" aria-label="API tokens">
          <thead className="text-2xs tracking-wide text-ink-500 uppercase">
            <tr>
              <th scope="col" className="py-1.5">
                Name
              </th>
              <th scope="col">Starts with</th>
              <th scope="col">Created</th>
              <th scope="col">Last used</th>
              <th scope="col">
                <span className="sr-only">Status</span>
              </th>
            </tr>
          </thead>
          <tbody className="divide-y divide-ink-100">
            {items.map((t) => (
              <tr key={t.id}>
                <td className="py-2 font-medium">{t.name}</td>
                <td className="font-mono text-xs">{t.prefix}…</td>
                <td className="text-ink-500 tabular">{t.createdAt.slice(0, 10)}</td>
                <td className="text-ink-500 tabular">
                  {t.lastUsedAt ? t.lastUsedAt.slice(0, 16).replace('T', ' ') : 'never'}
                </td>
                <td className="text-right">
                  {t.revokedAt ? (
                    <Badge tone="coral">revoked</Badge>
                  ) : (
                    <Button variant="danger" className="px-2 py-1 text-xs" onClick={() => revoke(t)}>
                      Revoke
                    </Button>
                  )}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </div>
  );
}
