import Link from 'next/link';
import { Card, CardHeader } from '@/components/ui/card';
import { PageHeader } from '@/components/ui/page-header';
import { Refusal } from '@/components/ui/refusal';
import { StudyForm } from '@/components/studies/study-form';
import { requirePagePermission } from '@/lib/auth';
import { listArrayChoices } from '@/lib/data/datasets';
import { STUDY_COST_BUDGET } from '@/lib/studies/monte-carlo';

export const metadata = { title: 'New study' };
export const dynamic = 'force-dynamic';

export default async function NewStudyPage() {
  const { user, allowed, message } = await requirePagePermission('studies.run');
  if (!allowed) return <Refusal message={message} />;
  const arrays = await listArrayChoices({ caller: user });
  return (
    <>
      <PageHeader
        kicker="Studies"
        title="New study"
        description={
          <>
            Simulate the scenario many times with a seed, estimate with each method, and compare the errors with the
            bound. Studies above about {STUDY_COST_BUDGET.toExponential(0)} estimated operations (roughly a minute) are
            refused with advice on shrinking them.{' '}
            <Link className="text-glass-700 hover:underline" href="/studies">
              All studies
            </Link>
          </>
        }
      />
      <Card aria-labelledby="form-title">
        <CardHeader id="form-title" title="Scenario and sweep" />
        <StudyForm arrays={arrays} />
      </Card>
    </>
  );
}
