'use client';
import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { apiSend, ClientApiError } from '@/lib/client/fetcher';

/**
 * Stops a queued or running job through its cancel endpoint
 * (POST /api/v1/estimates/{id}/cancel, /api/v1/studies/{id}/cancel), then
 * calls `onStopped` so the page refreshes its data. A refusal (for example
 * 409 when the job has just finished) is shown beside the button.
 */
export function StopButton({ url, label, onStopped }: { url: string; label: string; onStopped: () => void }) {
  const [state, setState] = useState<{ busy: boolean; error?: string }>({ busy: false });
  return (
    <span className="inline-flex items-center gap-2">
      <Button
        variant="secondary"
        disabled={state.busy}
        aria-label={label}
        onClick={async () => {
          setState({ busy: true });
          try {
            await apiSend('POST', url, {});
            setState({ busy: false });
            onStopped();
          } catch (err) {
            setState({ busy: false, error: err instanceof ClientApiError ? err.message : 'It could not be stopped.' });
          }
        }}
      >
        {state.busy ? 'Stopping…' : 'Stop'}
      </Button>
      {state.error ? (
        <span role="alert" className="text-sm text-red-700">
          {state.error}
        </span>
      ) : null}
    </span>
  );
}
