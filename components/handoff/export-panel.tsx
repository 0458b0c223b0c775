'use client';
import { useMemo, useState } from 'react';
import { buttonClass, Button } from '@/components/ui/button';
import { Card, CardHeader } from '@/components/ui/card';
import { Field, FormMessage, inputClass } from '@/components/ui/field';
import { cn } from '@/lib/client/cn';
import { apiSend } from '@/lib/client/fetcher';
import type { HandoffRunChoice } from '@/lib/data/bundles';

/** Export (download) and e-mail hand-off of one array revision, with the runs to include. */
export function ExportPanel({
  arrayId,
  revision,
  runs,
  canSend,
  datasetsAllowed,
}: {
  arrayId: number;
  revision: number;
  runs: HandoffRunChoice[];
  canSend: boolean;
  datasetsAllowed: boolean;
}) {
  const [chosen, setChosen] = useState<number[]>(runs.map((r) => r.id));
  const [recipient, setRecipient] = useState('');
  const [note, setNote] = useState('');
  const [status, setStatus] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null);
  const [fieldError, setFieldError] = useState<string | undefined>();
  const [busy, setBusy] = useState(false);
  const href = useMemo(() => {
    const q = new URLSearchParams({ revision: String(revision) });
    if (chosen.length) q.set('runs', chosen.join(','));
    return `/api/v1/arrays/${arrayId}/bundle?${q}`;
  }, [arrayId, revision, chosen]);

  async function send(e: React.FormEvent) {
    e.preventDefault();
    setBusy(true);
    setStatus(null);
    setFieldError(undefined);
    try {
      const out = await apiSend<{ recipientEmail: string; expiresAt: string; invited: boolean }>(
        'POST',
        '/api/handoff',
        {
          arrayId,
          revision,
          recipientEmail: recipient,
          note: note || undefined,
          runs: chosen,
        },
      );
      setStatus({
        tone: 'ok',
        text: `Sent to ${out.recipientEmail}. The link works until ${new Date(out.expiresAt).toUTCString()}.${out.invited ? ' They have no account yet, so they were also invited to your team as viewer.' : ''}`,
      });
      setRecipient('');
      setNote('');
    } catch (err) {
      const fields = (err as { fields?: Record<string, string[]> }).fields;
      setFieldError(fields?.recipientEmail?.[0]);
      setStatus({ tone: 'error', text: (err as Error).message });
    } finally {
      setBusy(false);
    }
  }

  return (
    <Card aria-labelledby="handoff-title">
      <CardHeader
        id="handoff-title"
        title="Hand-off bundle"
        description={`A checked zip of revision ${revision}: the configuration, calibration, charts, a plain-text summary, and the chosen runs with their data.`}
      />
      <div className="space-y-4 px-5 py-4">
        {runs.length ? (
          <fieldset>
            <legend className="text-sm font-medium text-ink-800">Estimate runs on this revision</legend>
            <ul className="mt-1 space-y-1">
              {runs.map((r) => (
                <li key={r.id}>
                  <label className="flex items-center gap-2 text-sm text-ink-700">
                    <input
                      type="checkbox"
                      checked={chosen.includes(r.id)}
                      onChange={(e) =>
                        setChosen((c) => (e.target.checked ? [...c, r.id] : c.filter((x) => x !== r.id)))
                      }
                    />
                    {r.label}
                    {r.datasetName ? <span className="text-ink-500">on “{r.datasetName}”</span> : null}
                  </label>
                </li>
              ))}
            </ul>
            {!datasetsAllowed ? (
              <p className="mt-1 text-xs text-amber-700">
                Your team does not let viewers export dataset files: runs go into the bundle without their data.
              </p>
            ) : null}
          </fieldset>
        ) : (
          <p className="text-sm text-ink-500">
            No finished estimate runs use this revision yet; the bundle holds the array alone.
          </p>
        )}
        <a href={href} download className={buttonClass('secondary')} data-testid="export-bundle">
          Download bundle (.zip)
        </a>
        {canSend ? (
          <form onSubmit={send} className="space-y-3 border-t border-ink-100 pt-4" aria-label="Send by e-mail">
            <Field
              id="handoff-recipient"
              label="Send to (e-mail)"
              type="email"
              required
              value={recipient}
              onChange={(e) => setRecipient(e.target.value)}
              error={fieldError}
              hint="A signed link that expires in 7 days. When an admin sends it to someone without an account, they are also invited to your team as viewer."
            />
            <div>
              <label htmlFor="handoff-note" className="block text-sm font-medium text-ink-800">
                Note
              </label>
              <textarea
                id="handoff-note"
                rows={3}
                maxLength={2000}
                value={note}
                onChange={(e) => setNote(e.target.value)}
                className={cn(inputClass, 'mt-1')}
              />
            </div>
            {status ? <FormMessage tone={status.tone}>{status.text}</FormMessage> : null}
            <Button type="submit" disabled={busy || !recipient}>
              {busy ? 'Sending…' : 'Send hand-off'}
            </Button>
          </form>
        ) : null}
      </div>
    </Card>
  );
}
