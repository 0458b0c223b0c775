import { EmptyState } from '@/components/ui/empty-state';
import { PageHeader } from '@/components/ui/page-header';
import { Refusal } from '@/components/ui/refusal';
import { requirePagePermission } from '@/lib/auth';
import { can, refusalMessage, type Permission } from '@/lib/auth/permissions';

/** An area that a later feature fills: says what will live here and what the signed-in role will be able to do. */
export async function AreaPlaceholder({
  read,
  write,
  title,
  kicker,
  description,
  emptyTitle,
  emptyText,
  points,
}: {
  read: Permission;
  write?: Permission;
  title: string;
  kicker: string;
  description: string;
  emptyTitle: string;
  emptyText: string;
  points: string[];
}) {
  const { user, allowed, message } = await requirePagePermission(read);
  if (!allowed) return <Refusal message={message} />;
  return (
    <>
      <PageHeader kicker={kicker} title={title} description={description} />
      <EmptyState title={emptyTitle} points={points}>
        <p>{emptyText}</p>
        {write ? (
          <p className="mt-2 text-ink-500">
            {can(user.role, write)
              ? `As ${user.role}, you will be able to ${phrase(write)} here.`
              : `${refusalMessage(user.role, write)} You will be able to read what your team adds.`}
          </p>
        ) : null}
      </EmptyState>
    </>
  );
}

function phrase(p: Permission): string {
  return refusalMessage('admin', p)
    .replace(/^Your role \(admin\) cannot /, '')
    .replace(/\.$/, '');
}
