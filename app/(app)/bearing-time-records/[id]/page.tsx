import Link from 'next/link';
import { notFound } from 'next/navigation';
import { PageHeader } from '@/components/ui/page-header';
import { Refusal } from '@/components/ui/refusal';
import { RecordView } from '@/components/btr/record-view';
import { requirePagePermission } from '@/lib/auth';
import { can } from '@/lib/auth/permissions';

export const metadata = { title: 'Bearing–time record' };
export const dynamic = 'force-dynamic';

export default async function BearingTimeRecordPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const { user, allowed, message } = await requirePagePermission('datasets.read');
  if (!allowed) return <Refusal message={message} />;
  if (!/^[1-9][0-9]{0,15}$/.test(id)) notFound();
  return (
    <>
      <PageHeader
        kicker="Bearing–time record"
        title={`Record ${id}`}
        description={
          <Link className="text-glass-700 hover:underline" href="/bearing-time-records">
            All records
          </Link>
        }
      />
      <RecordView id={Number(id)} canEdit={can(user.role, 'estimates.run')} />
    </>
  );
}
