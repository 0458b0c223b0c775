'use client';
import { useState } from 'react';
import Link from 'next/link';
import { Designer } from '@/components/designer/designer';
import { Badge } from '@/components/ui/badge';
import { apiSend } from '@/lib/client/fetcher';
import { useApi } from '@/lib/client/use-api';
import { cn } from '@/lib/client/cn';
import type { ArrayDetailDto } from '@/lib/data/arrays';
import type { ArrayInput } from '@/lib/validations/array';
import { formatWhen } from './format';
import { saveErrors } from './save-errors';

/**
 * One array: the designer on the revision shown, and the revision list.
 * The latest revision is editable when `canEdit`; saving PATCHes the array,
 * which adds a revision, and the list refreshes from GET /api/v1/arrays/{id}.
 * An older revision (`?rev=N`) always opens read-only.
 */
export function ArrayWorkspace({
  initial,
  canEdit,
  readOnlyReason,
}: {
  initial: ArrayDetailDto;
  canEdit: boolean;
  readOnlyReason?: string;
}) {
  const key = `/api/v1/arrays/${initial.id}`;
  const { data, mutate } = useApi<ArrayDetailDto>(
    key,
    initial.revision === initial.latestRevision ? initial : undefined,
  );
  const viewingOld = initial.revision < initial.latestRevision;
  // While an old revision is shown, `data` (the latest) only feeds the revision list.
  const latest = data ?? initial;
  const editable = canEdit && !viewingOld;
  const [serverErrors, setServerErrors] = useState<Record<string, string[]>>();

  async function save(input: ArrayInput) {
    setServerErrors(undefined);
    try {
      const saved = await apiSend<ArrayDetailDto>('PATCH', key, input);
      await mutate(saved, { revalidate: false });
    } catch (err) {
      setServerErrors(saveErrors(err));
      throw err;
    }
  }

  const shown = viewingOld ? initial : latest;
  return (
    <div className="space-y-4">
      <p className="flex flex-wrap items-center gap-2 text-sm text-ink-600" data-testid="revision-status">
        <Badge tone={viewingOld ? 'amber' : 'teal'}>
          revision {shown.revision} of {latest.latestRevision}
        </Badge>
        <span>
          saved by {shown.author?.name ?? 'a former member'} on {formatWhen(shown.revisionCreatedAt)}
        </span>
      </p>
      {viewingOld ? (
        <p
          role="note"
          data-testid="old-revision-note"
          className="rounded-md border border-amber-200 bg-amber-50 px-4 py-2.5 text-sm text-ink-800"
        >
          You are looking at revision {initial.revision} of {latest.latestRevision}, saved by{' '}
          {initial.author?.name ?? 'a former member'} on {formatWhen(initial.revisionCreatedAt)}. Old revisions never
          change, so this view is read-only.{' '}
          <Link href={`/arrays/${initial.id}`} className="font-medium text-glass-700 underline underline-offset-2">
            Open the latest revision (r{latest.latestRevision})
          </Link>
        </p>
      ) : !canEdit && readOnlyReason ? (
        <p
          role="note"
          data-testid="read-only-note"
          className="rounded-md border border-amber-200 bg-amber-50 px-4 py-2.5 text-sm text-ink-800"
        >
          {readOnlyReason} This array opens read-only for you; an engineer or admin can save new revisions.
        </p>
      ) : null}
      <Designer
        key={`${initial.id}-r${initial.revision}`}
        initial={initial.config}
        readOnly={!editable}
        onSave={editable ? save : undefined}
        serverErrors={serverErrors}
      />
      <Revisions detail={latest} shown={viewingOld ? initial.revision : latest.revision} />
    </div>
  );
}

function Revisions({ detail, shown }: { detail: ArrayDetailDto; shown: number }) {
  return (
    <section className="rounded-card border border-ink-100 bg-white shadow-card" aria-labelledby="revisions-title">
      <header className="border-b border-ink-100 px-5 py-4">
        <h2 id="revisions-title" className="text-base font-semibold">
          Revisions
        </h2>
        <p className="mt-0.5 text-sm text-ink-500">
          Every save is a new revision; estimates point to the exact one they used. Older revisions open read-only.
        </p>
      </header>
      <ol className="divide-y divide-ink-100" data-testid="revision-list">
        {detail.revisions.map((r) => (
          <li
            key={r.revision}
            data-testid={`revision-${r.revision}`}
            className={cn(
              'flex flex-wrap items-baseline gap-x-4 gap-y-1 px-5 py-2.5 text-sm',
              r.revision === shown && 'bg-glass-50/60',
            )}
          >
            <Link
              href={
                r.revision === detail.latestRevision ? `/arrays/${detail.id}` : `/arrays/${detail.id}?rev=${r.revision}`
              }
              className="font-mono font-medium text-glass-700 underline-offset-2 hover:underline"
            >
              r{r.revision}
            </Link>
            {r.revision === detail.latestRevision ? <Badge tone="teal">latest</Badge> : null}
            {r.revision === shown ? <Badge tone="ink">shown</Badge> : null}
            <span className="text-ink-800">{r.author?.name ?? 'former member'}</span>
            <span className="text-ink-500 tabular">{formatWhen(r.createdAt)}</span>
            <span className="text-ink-500 tabular">
              {r.elements} elements at {r.spacingWavelengths.toFixed(4)} λ
            </span>
          </li>
        ))}
      </ol>
    </section>
  );
}
