'use client';
import { useState } from 'react';
import { apiSend } from '@/lib/client/fetcher';
import { FormMessage } from '@/components/ui/field';
import type { TeamDto } from '@/lib/data/dto';

export function TeamSettingsForm({ team }: { team: TeamDto }) {
  const [value, setValue] = useState(team.settings.allowViewerDatasetExport);
  const [message, setMessage] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null);
  async function toggle(next: boolean) {
    setValue(next);
    try {
      await apiSend('PATCH', '/api/team', { allowViewerDatasetExport: next });
      setMessage({
        tone: 'ok',
        text: next ? 'Viewers may now download dataset files.' : 'Viewers may no longer download dataset files.',
      });
    } catch (err) {
      setValue(!next);
      setMessage({ tone: 'error', text: (err as Error).message });
    }
  }
  return (
    <div className="space-y-3 px-5 py-4">
      <label className="flex items-start gap-3 text-sm">
        <input
          type="checkbox"
          checked={value}
          onChange={(e) => toggle(e.target.checked)}
          className="mt-0.5 h-4 w-4 accent-glass-600"
        />
        <span>
          <span className="font-medium">Viewers may download dataset files</span>
          <span className="block text-ink-500">
            Off by default: recordings from trials can be sensitive. Engineers, reviewers and admins can always
            download.
          </span>
        </span>
      </label>
      {message ? <FormMessage tone={message.tone}>{message.text}</FormMessage> : null}
    </div>
  );
}
