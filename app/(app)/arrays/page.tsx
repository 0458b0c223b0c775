import Link from 'next/link';
import { ArraysTable } from '@/components/arrays/arrays-table';
import { buttonClass } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { EmptyState } from '@/components/ui/empty-state';
import { PageHeader } from '@/components/ui/page-header';
import { Refusal } from '@/components/ui/refusal';
import { requirePagePermission } from '@/lib/auth';
import { listArrays } from '@/lib/data/arrays';
import { can, refusalMessage } from '@/lib/auth/permissions';

export const metadata = { title: 'Arrays' };

export default async function ArraysPage() {
  const { user, allowed, message } = await requirePagePermission('arrays.read');
  if (!allowed) return <Refusal message={message} />;
  const canEdit = can(user.role, 'arrays.edit');
  const arrays = await listArrays({ caller: user });
  return (
    <>
      <PageHeader
        kicker="Design"
        title="Arrays"
        description="Uniform linear arrays of your team: element count, spacing for a band, taper and per-element state. Every save is a new revision that estimates can point to."
        actions={
          canEdit ? (
            <Link href="/arrays/new" className={buttonClass('primary')} data-testid="new-array">
              New array
            </Link>
          ) : null
        }
      />
      {!canEdit ? (
        <p role="note" className="mb-4 rounded-md border border-amber-200 bg-amber-50 px-4 py-2.5 text-sm text-ink-800">
          {refusalMessage(user.role, 'arrays.edit')} You can open every array and its revisions read-only.
        </p>
      ) : null}
      {arrays.length === 0 ? (
        <EmptyState title="No arrays yet">
          <p>
            {canEdit
              ? 'Start one with “New array”: draw a line array to scale, stretch its spacing, switch elements off, and read the beam it will give you.'
              : 'When an engineer or admin saves an array, it appears here.'}
          </p>
        </EmptyState>
      ) : (
        <Card>
          <ArraysTable initial={arrays} />
        </Card>
      )}
    </>
  );
}
