'use client';
import { useState } from 'react';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { Card, CardHeader } from '@/components/ui/card';
import { FormMessage, inputClass } from '@/components/ui/field';
import { cn } from '@/lib/client/cn';
import type { ReviewThreadDto } from '@/lib/data/reviews';
import { apiSend } from '@/lib/client/fetcher';

const when = (iso: string) =>
  new Date(iso).toLocaleString('en-GB', { dateStyle: 'medium', timeStyle: 'short', timeZone: 'UTC' }) + ' UTC';

const kindLabel = { comment: 'comment', approval: 'approved', 'changes-requested': 'changes requested' } as const;
const kindTone = { comment: 'ink', approval: 'teal', 'changes-requested': 'coral' } as const;

/** The sign-off banner of one revision (or run): who approved it and when. */
export function SignOffBanner({ thread, what }: { thread: ReviewThreadDto; what: string }) {
  if (thread.signOffs.length === 0) {
    return (
      <p className="rounded-md border border-ink-100 bg-ink-50 px-3 py-2 text-sm text-ink-600" data-testid="sign-off">
        {what} has no sign-off yet{thread.status === 'changes-requested' ? ': changes were requested.' : '.'}
      </p>
    );
  }
  return (
    <div
      className="rounded-md border border-glass-200 bg-glass-50 px-3 py-2 text-sm text-glass-900"
      data-testid="sign-off"
      role="status"
    >
      {thread.signOffs.map((s, i) => (
        <p key={i}>
          <span className="font-semibold">Signed off</span> by {s.by} ({s.role}) on{' '}
          <time dateTime={s.at}>{when(s.at)}</time>
          {s.note ? <span className="text-glass-800">: “{s.note}”</span> : null}
        </p>
      ))}
      {thread.status === 'changes-requested' ? (
        <p className="mt-1 font-medium text-coral-700">Changes were requested after the last sign-off.</p>
      ) : null}
    </div>
  );
}

/** Review thread and form for one array revision or one run. */
export function ReviewPanel({
  initial,
  target,
  canComment,
  canApprove,
  title,
  description,
}: {
  initial: ReviewThreadDto;
  target: { arrayId: number; revision: number } | { runId: number };
  canComment: boolean;
  canApprove: boolean;
  title: string;
  /** Defaults to the wording for an array revision. */
  description?: string;
}) {
  const [thread, setThread] = useState(initial);
  const [body, setBody] = useState('');
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const what = 'runId' in target ? `Run ${target.runId}` : `Revision ${target.revision}`;

  async function submit(kind: 'comment' | 'approval' | 'changes-requested') {
    setBusy(true);
    setError(null);
    try {
      const next = await apiSend<ReviewThreadDto>('POST', '/api/v1/reviews', { ...target, kind, body });
      setThread(next);
      setBody('');
    } catch (err) {
      setError((err as Error).message);
    } finally {
      setBusy(false);
    }
  }

  return (
    <Card aria-labelledby="review-title">
      <CardHeader
        id="review-title"
        title={title}
        description={
          description ??
          'Comments, sign-off and requests for changes. A sign-off belongs to this revision only; an edit makes a new revision that needs its own.'
        }
      />
      <div className="space-y-4 px-5 py-4">
        <SignOffBanner thread={thread} what={what} />
        {thread.items.length ? (
          <ol className="space-y-3" aria-label="Review thread">
            {thread.items.map((item) => (
              <li key={item.id} className="rounded-md border border-ink-100 px-3 py-2">
                <p className="flex flex-wrap items-center gap-2 text-xs text-ink-500">
                  <span className="font-medium text-ink-800">{item.author?.name ?? 'a former member'}</span>
                  {item.author ? <span>{item.author.role}</span> : null}
                  <Badge tone={kindTone[item.kind]}>{kindLabel[item.kind]}</Badge>
                  <time dateTime={item.createdAt}>{when(item.createdAt)}</time>
                </p>
                {item.body ? <p className="mt-1 text-sm whitespace-pre-line text-ink-800">{item.body}</p> : null}
              </li>
            ))}
          </ol>
        ) : (
          <p className="text-sm text-ink-500">No comments yet.</p>
        )}
        {canComment ? (
          <form
            className="space-y-2"
            onSubmit={(e) => {
              e.preventDefault();
              void submit('comment');
            }}
          >
            <label htmlFor="review-body" className="block text-sm font-medium text-ink-800">
              {canApprove ? 'Comment, or a note with your decision' : 'Reply with a comment'}
            </label>
            <textarea
              id="review-body"
              value={body}
              onChange={(e) => setBody(e.target.value)}
              rows={3}
              maxLength={4000}
              className={cn(inputClass, 'mt-1')}
            />
            {error ? <FormMessage tone="error">{error}</FormMessage> : null}
            <div className="flex flex-wrap gap-2">
              <Button type="submit" variant="secondary" disabled={busy || !body.trim()}>
                Comment
              </Button>
              {canApprove ? (
                <>
                  <Button onClick={() => void submit('approval')} disabled={busy}>
                    Approve and sign off
                  </Button>
                  <Button
                    variant="danger"
                    onClick={() => void submit('changes-requested')}
                    disabled={busy || !body.trim()}
                    title="Say what should change in the box above"
                  >
                    Ask for changes
                  </Button>
                </>
              ) : null}
            </div>
          </form>
        ) : (
          <p className="text-sm text-ink-500">Your role can read the review but not comment.</p>
        )}
      </div>
    </Card>
  );
}
