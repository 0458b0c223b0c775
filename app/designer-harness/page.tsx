/**
 * TEMPORARY harness for the array designer, until the arrays pages are wired.
 * Invented demo scenario. `?readonly=1` shows the read-only mode.
 * Remove once app/(app)/arrays/[id] renders <Designer>.
 */
import { HarnessClient } from './harness-client';

export const metadata = { title: 'Designer harness (temporary)' };

export default async function DesignerHarnessPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const params = await searchParams;
  const readOnly = params.readonly === '1';
  return (
    <main className="mx-auto max-w-[1400px] p-6">
      <h1 className="mb-4 text-xl font-semibold">Array designer harness (temporary)</h1>
      <HarnessClient readOnly={readOnly} />
    </main>
  );
}
