'use client';
import { useState } from 'react';
import type { OutboxDto } from '@/lib/data/dto';
import { cn } from '@/lib/client/cn';
import { inputClass } from '@/components/ui/field';

/** Captured messages on the left, the selected one on the right; links in the text are clickable. */
export function OutboxList({ messages }: { messages: OutboxDto[] }) {
  const [selected, setSelected] = useState<number | null>(messages[0]?.id ?? null);
  const [filter, setFilter] = useState('');
  const shown = messages.filter((m) => `${m.to} ${m.subject}`.toLowerCase().includes(filter.toLowerCase()));
  const current = messages.find((m) => m.id === selected) ?? null;
  return (
    <div className="grid min-h-[24rem] md:grid-cols-[minmax(0,2fr)_minmax(0,3fr)]">
      <div className="border-b border-ink-100 md:border-r md:border-b-0">
        <div className="px-4 py-3">
          <label htmlFor="outbox-filter" className="sr-only">
            Filter messages
          </label>
          <input
            id="outbox-filter"
            type="search"
            value={filter}
            onChange={(e) => setFilter(e.target.value)}
            placeholder="Filter by recipient or subject"
            className={cn(inputClass, 'py-1.5')}
          />
        </div>
        <ul aria-label="Captured messages" className="max-h-[32rem] overflow-y-auto">
          {shown.map((m) => (
            <li key={m.id}>
              <button
                type="button"
                onClick={() => setSelected(m.id)}
                aria-pressed={m.id === selected}
                className={cn(
                  'block w-full border-l-2 px-4 py-2.5 text-left',
                  m.id === selected ? 'border-glass-500 bg-glass-50/60' : 'border-transparent hover:bg-ink-50',
                )}
              >
                <span className="block truncate text-sm font-medium">{m.subject}</span>
                <span className="block truncate font-mono text-2xs text-ink-500">{m.to}</span>
                <span className="block text-2xs text-ink-400 tabular">
                  {m.receivedAt.replace('T', ' ').slice(0, 19)} UTC
                </span>
              </button>
            </li>
          ))}
          {shown.length === 0 ? <li className="px-4 py-6 text-sm text-ink-500">No messages match.</li> : null}
        </ul>
      </div>
      <article className="min-w-0 px-5 py-4" aria-live="polite">
        {current ? (
          <>
            <h3 className="text-base font-semibold">{current.subject}</h3>
            <dl className="mt-2 grid grid-cols-[4rem_1fr] gap-y-1 text-xs">
              <dt className="text-ink-500">From</dt>
              <dd className="font-mono">{current.from}</dd>
              <dt className="text-ink-500">To</dt>
              <dd className="font-mono">{current.to}</dd>
            </dl>
            <div
              className="mt-4 rounded-md bg-ink-50 p-4 font-mono text-xs leading-relaxed break-words whitespace-pre-wrap"
              data-testid="outbox-body"
            >
              {linkify(current.text)}
            </div>
          </>
        ) : (
          <p className="text-sm text-ink-500">Select a message.</p>
        )}
      </article>
    </div>
  );
}

function linkify(text: string): React.ReactNode[] {
  return text.split(/(https?:\/\/\S+)/g).map((part, i) =>
    /^https?:\/\//.test(part) ? (
      <a key={i} href={part} className="text-glass-700 underline">
        {part}
      </a>
    ) : (
      part
    ),
  );
}
