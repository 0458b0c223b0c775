import Link from 'next/link';
import { notFound } from 'next/navigation';
import { PageHeader } from '@/components/ui/page-header';
import { Refusal } from '@/components/ui/refusal';
import { StudyView } from '@/components/studies/study-view';
import { ApiError } from '@/lib/http';
import { requirePagePermission } from '@/lib/auth';
import { can } from '@/lib/auth/permissions';
import { getStudy } from '@/lib/data/studies';

export const dynamic = 'force-dynamic';

export default async function StudyPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const { user, allowed, message } = await requirePagePermission('arrays.read');
  if (!allowed) return <Refusal message={message} />;
  if (!/^[1-9][0-9]{0,15}$/.test(id)) notFound();
  let study;
  try {
    study = await getStudy({ caller: user, id: Number(id) });
  } catch (err) {
    if (err instanceof ApiError && err.status === 404) notFound();
    throw err;
  }
  return (
    <>
      <PageHeader
        kicker="Study"
        title={study.name}
        description={
          <>
            Started by {study.createdBy?.name ?? 'a former member'} on{' '}
            {new Date(study.createdAt).toLocaleString('en-GB')}.{' '}
            <Link className="text-glass-700 hover:underline" href="/studies">
              All studies
            </Link>
          </>
        }
      />
      <StudyView id={study.id} initial={study} canEdit={can(user.role, 'studies.run')} />
    </>
  );
}
