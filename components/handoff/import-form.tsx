'use client';
import Link from 'next/link';
import { useState } from 'react';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { Card, CardHeader } from '@/components/ui/card';
import { FormMessage } from '@/components/ui/field';
import type { ImportResult } from '@/lib/data/bundles';
import { apiSend } from '@/lib/client/fetcher';

const deg = (v: number) => `${v.toFixed(6)}°`;

function ImportReport({ result }: { result: ImportResult }) {
  return (
    <div className="space-y-4" data-testid="import-result">
      <FormMessage tone={result.reproduced === false ? 'warn' : 'ok'}>
        Imported “{result.name}” as a new array in your team (revision 1, from revision {result.sourceRevision} of the
        sender’s), with {result.datasets.length} dataset(s) and {result.runs.length} run(s).{' '}
        <Link href={`/arrays/${result.arrayId}`} className="font-medium underline underline-offset-2">
          Open the array
        </Link>
      </FormMessage>
      <p className="text-sm text-ink-600">
        Bundle “{result.bundle.title}” by {result.bundle.author.name} ({result.bundle.author.email}), written{' '}
        {new Date(result.bundle.createdAt).toUTCString()} with software {result.bundle.softwareVersion};{' '}
        {result.bundle.files} files, every SHA-256 checked.
        {result.signOffsInSource.length
          ? ` Signed off at the sender’s by ${result.signOffsInSource.map((s) => s.by).join(', ')} (a sign-off does not carry over: review it here).`
          : ''}
      </p>
      {result.runs.map((run) => (
        <div key={run.id} className="rounded-md border border-ink-100 px-3 py-2">
          <p className="flex items-center gap-2 text-sm font-medium text-ink-800">
            Run {run.originalId} → run {run.id}
            {run.reproduced === true ? (
              <Badge tone="teal">reproduced</Badge>
            ) : run.reproduced === false ? (
              <Badge tone="coral">differs</Badge>
            ) : (
              <Badge tone="amber">not re-run</Badge>
            )}
          </p>
          {run.note ? <p className="text-sm text-ink-600">{run.note}</p> : null}
          {run.comparison?.error ? <p className="text-sm text-coral-700">{run.comparison.error}</p> : null}
          {run.comparison?.methods.length ? (
            <table className="mt-2 w-full text-left text-xs">
              <thead className="text-ink-500">
                <tr>
                  <th className="py-1 pr-2 font-medium">method</th>
                  <th className="py-1 pr-2 font-medium">stored bearings</th>
                  <th className="py-1 pr-2 font-medium">re-run here</th>
                  <th className="py-1 font-medium">largest |difference|</th>
                </tr>
              </thead>
              <tbody className="font-mono">
                {run.comparison.methods.map((m) => (
                  <tr key={m.method} className="border-t border-ink-100 align-top">
                    <td className="py-1 pr-2">{m.method}</td>
                    <td className="py-1 pr-2">{m.storedDeg.map(deg).join(', ')}</td>
                    <td className="py-1 pr-2">{m.recomputedDeg.map(deg).join(', ')}</td>
                    <td className="py-1" data-testid={`diff-${m.method}`}>
                      {m.maxAbsDifferenceDeg === null ? (
                        m.message
                      ) : m.reproduced ? (
                        `${m.maxAbsDifferenceDeg.toExponential(2)}° (reproduced)`
                      ) : (
                        <span className="text-coral-700">{m.message}</span>
                      )}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          ) : null}
        </div>
      ))}
    </div>
  );
}

/** Import a bundle from a file, or straight from a hand-off link (?link=…) the caller received. */
export function ImportForm({ linkToken }: { linkToken?: string }) {
  const [file, setFile] = useState<File | null>(null);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [result, setResult] = useState<ImportResult | null>(null);

  async function importBlob(blob: Blob, name: string) {
    const form = new FormData();
    form.append('file', blob, name);
    setResult(await apiSend<ImportResult>('POST', '/api/v1/bundles', form));
  }

  async function run(action: () => Promise<void>) {
    setBusy(true);
    setError(null);
    setResult(null);
    try {
      await action();
    } catch (err) {
      setError((err as Error).message);
    } finally {
      setBusy(false);
    }
  }

  async function fromLink() {
    const res = await fetch(`/api/handoff/${encodeURIComponent(linkToken!)}`, {
      headers: { accept: 'application/zip' },
    });
    if (!res.ok) {
      const body = await res.json().catch(() => null);
      throw new Error(body?.error?.message ?? `The link did not work (${res.status}).`);
    }
    await importBlob(await res.blob(), 'handoff.zip');
  }

  return (
    <Card aria-labelledby="import-title">
      <CardHeader
        id="import-title"
        title="Import a bundle"
        description="Creates a new array (revision 1) in your team with the bundle’s datasets and runs; nothing existing is changed. Each run is re-executed here and compared with the bearings it stored."
      />
      <div className="space-y-4 px-5 py-4">
        {linkToken ? (
          <div className="rounded-md border border-glass-200 bg-glass-50 px-3 py-3 text-sm">
            <p className="text-glass-900">You opened a hand-off link. Import the bundle it points to into your team:</p>
            <Button className="mt-2" onClick={() => void run(fromLink)} disabled={busy}>
              {busy ? 'Importing…' : 'Import the bundle from the link'}
            </Button>
          </div>
        ) : null}
        <form
          className="flex flex-wrap items-end gap-3"
          onSubmit={(e) => {
            e.preventDefault();
            if (file) void run(() => importBlob(file, file.name));
          }}
        >
          <div>
            <label htmlFor="bundle-file" className="block text-sm font-medium text-ink-800">
              Bundle file (.zip)
            </label>
            <input
              id="bundle-file"
              type="file"
              accept=".zip,application/zip"
              className="mt-1 block text-sm"
              onChange={(e) => setFile(e.target.files?.[0] ?? null)}
            />
          </div>
          <Button type="submit" variant={linkToken ? 'secondary' : 'primary'} disabled={busy || !file}>
            {busy ? 'Importing…' : 'Import file'}
          </Button>
        </form>
        {error ? (
          <FormMessage tone="error">
            The bundle was not imported: {error.replace(/^The bundle was refused: /, '')}
          </FormMessage>
        ) : null}
        {result ? <ImportReport result={result} /> : null}
      </div>
    </Card>
  );
}
