import Link from 'next/link';
import { Card, CardHeader } from '@/components/ui/card';
import { PageHeader } from '@/components/ui/page-header';
import { Refusal } from '@/components/ui/refusal';
import { buttonClass } from '@/components/ui/button';
import { StudiesTable } from '@/components/studies/studies-table';
import { requirePagePermission } from '@/lib/auth';
import { can } from '@/lib/auth/permissions';
import { listStudies } from '@/lib/data/studies';

export const metadata = { title: 'Studies' };
export const dynamic = 'force-dynamic';

export default async function StudiesPage() {
  const { user, allowed, message } = await requirePagePermission('arrays.read');
  if (!allowed) return <Refusal message={message} />;
  const canRun = can(user.role, 'studies.run');
  const studies = await listStudies({ caller: user });
  return (
    <>
      <PageHeader
        kicker="Before hardware"
        title="Studies"
        description="Seeded Monte Carlo simulations that predict bearing accuracy for an array before it exists: RMSE of each method against the Cramér–Rao bound as SNR, snapshot count or element count changes, with the chance of resolving close sources."
      />
      <div className="mb-4 flex items-center justify-between gap-3">
        {canRun ? (
          <Link href="/studies/new" className={buttonClass('primary')}>
            New study
          </Link>
        ) : (
          <p className="text-sm text-ink-600">
            Your role ({user.role}) can read studies; engineers and admins start them.
          </p>
        )}
      </div>
      <Card aria-labelledby="studies-title">
        <CardHeader id="studies-title" title="All studies" />
        <StudiesTable rows={studies} />
      </Card>
    </>
  );
}
