'use client';
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { Button } from '@/components/ui/button';
import { apiSend } from '@/lib/client/fetcher';

export function DeleteDatasetButton({ id, name }: { id: number; name: string }) {
  const router = useRouter();
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  return (
    <span className="flex items-center gap-2">
      {error ? (
        <span role="alert" className="text-xs text-coral-700">
          {error}
        </span>
      ) : null}
      <Button
        variant="danger"
        disabled={busy}
        onClick={async () => {
          if (
            !window.confirm(
              `Delete dataset "${name}" and its stored file? Runs keep its checksum but cannot be re-run.`,
            )
          )
            return;
          setBusy(true);
          try {
            await apiSend('DELETE', `/api/v1/datasets/${id}`);
            router.push('/datasets');
            router.refresh();
          } catch (e) {
            setError((e as Error).message);
            setBusy(false);
          }
        }}
      >
        Delete
      </Button>
    </span>
  );
}
