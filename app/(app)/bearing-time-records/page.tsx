import Link from 'next/link';
import { Card, CardHeader } from '@/components/ui/card';
import { PageHeader } from '@/components/ui/page-header';
import { Refusal } from '@/components/ui/refusal';
import { buttonClass } from '@/components/ui/button';
import { RecordsTable } from '@/components/btr/records-table';
import { requirePagePermission } from '@/lib/auth';
import { can } from '@/lib/auth/permissions';

export const metadata = { title: 'Bearing–time records' };
export const dynamic = 'force-dynamic';

export default async function BearingTimeRecordsPage() {
  const { user, allowed, message } = await requirePagePermission('datasets.read');
  if (!allowed) return <Refusal message={message} />;
  const canRun = can(user.role, 'estimates.run');
  return (
    <>
      <PageHeader
        kicker="Long recordings"
        title="Bearing–time records"
        description="A long broadband recording cut into blocks: each block's wideband spectrum becomes one row of a picture with bearing across and time down, its bearings are estimated with ±1σ, and the bearings are joined into tracks."
      />
      <div className="mb-4 flex items-center justify-between gap-3">
        {canRun ? (
          <Link href="/bearing-time-records/new" className={buttonClass('primary')} data-testid="btr-new">
            New record
          </Link>
        ) : (
          <p className="text-sm text-ink-600">
            Your role ({user.role}) can read records; engineers and admins start them.
          </p>
        )}
      </div>
      <Card aria-labelledby="records-title">
        <CardHeader id="records-title" title="All records" />
        <RecordsTable />
      </Card>
    </>
  );
}
