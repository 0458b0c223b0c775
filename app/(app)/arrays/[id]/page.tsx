import Link from 'next/link';
import { notFound } from 'next/navigation';
import { ArrayWorkspace } from '@/components/arrays/array-workspace';
import { ArrayHandoffSection } from '@/components/handoff/array-handoff-section';
import { CalibrationPanel } from '@/components/arrays/calibration-panel';
import { formatWhen } from '@/components/arrays/format';
import { PageHeader } from '@/components/ui/page-header';
import { Refusal } from '@/components/ui/refusal';
import { ApiError } from '@/lib/http';
import { requirePagePermission } from '@/lib/auth';
import { getArray, type ArrayDetailDto } from '@/lib/data/arrays';
import { can, refusalMessage } from '@/lib/auth/permissions';

export const metadata = { title: 'Array' };

type Props = { params: Promise<{ id: string }>; searchParams: Promise<Record<string, string | string[] | undefined>> };

const positiveInt = (raw: string | string[] | undefined): number | undefined =>
  typeof raw === 'string' && /^[1-9][0-9]{0,8}$/.test(raw) ? Number(raw) : undefined;

export default async function ArrayPage({ params, searchParams }: Props) {
  const [{ id }, query] = await Promise.all([params, searchParams]);
  const { user, allowed, message } = await requirePagePermission('arrays.read');
  if (!allowed) return <Refusal message={message} />;
  const arrayId = positiveInt(id);
  if (arrayId === undefined) notFound();
  let array: ArrayDetailDto;
  try {
    array = await getArray({ caller: user, id: arrayId, revision: positiveInt(query.rev) });
  } catch (err) {
    if (err instanceof ApiError && err.code === 'not_found') notFound();
    throw err;
  }
  const canEdit = can(user.role, 'arrays.edit');
  return (
    <>
      <PageHeader
        kicker="Array"
        title={array.name}
        description={
          <>
            Created by {array.createdBy?.name ?? 'a former member'} on {formatWhen(array.createdAt)}.{' '}
            <Link href="/arrays" className="text-glass-700 underline underline-offset-2">
              All arrays
            </Link>
          </>
        }
      />
      <ArrayWorkspace
        initial={array}
        canEdit={canEdit}
        readOnlyReason={canEdit ? undefined : refusalMessage(user.role, 'arrays.edit')}
      />
      {array.revision === array.latestRevision ? (
        <CalibrationPanel
          arrayId={array.id}
          elements={array.elements}
          currentStates={array.config.elementStates ?? null}
          canEdit={canEdit}
          readOnlyReason={canEdit ? undefined : refusalMessage(user.role, 'arrays.edit')}
        />
      ) : null}
      <ArrayHandoffSection caller={user} arrayId={array.id} revision={array.revision} />
    </>
  );
}
