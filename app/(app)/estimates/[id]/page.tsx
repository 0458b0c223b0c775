import Link from 'next/link';
import { notFound } from 'next/navigation';
import { PageHeader } from '@/components/ui/page-header';
import { Refusal } from '@/components/ui/refusal';
import { RunView, type RunDto } from '@/components/estimates/run-view';
import { ApiError } from '@/lib/http';
import { requirePagePermission } from '@/lib/auth';
import { can } from '@/lib/auth/permissions';
import { getEstimateRun } from '@/lib/data/estimates';
import { listReviews } from '@/lib/data/reviews';
import { ReviewPanel } from '@/components/review/review-panel';

export const dynamic = 'force-dynamic';

export default async function EstimateRunPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const { user, allowed, message } = await requirePagePermission('datasets.read');
  if (!allowed) return <Refusal message={message} />;
  if (!/^[1-9][0-9]{0,15}$/.test(id)) notFound();
  let run;
  try {
    run = await getEstimateRun({ caller: user, id: Number(id) });
  } catch (err) {
    if (err instanceof ApiError && err.status === 404) notFound();
    throw err;
  }
  const thread = await listReviews({ caller: user, runId: run.id });
  return (
    <>
      <PageHeader
        kicker="Estimate run"
        title={`Run #${run.id}`}
        description={
          <>
            Started by {run.createdBy?.name ?? 'a former member'} on {new Date(run.createdAt).toLocaleString('en-GB')}.{' '}
            <Link className="text-glass-700 hover:underline" href="/estimates">
              All runs
            </Link>
          </>
        }
      />
      <RunView id={run.id} initial={run as unknown as RunDto} canRun={can(user.role, 'estimates.run')} />
      <div className="mt-8 max-w-3xl" id="review">
        <ReviewPanel
          initial={thread}
          target={{ runId: run.id }}
          canComment={can(user.role, 'review.comment')}
          canApprove={can(user.role, 'review.approve')}
          title={`Review of run #${run.id}`}
          description={
            run.status === 'done'
              ? 'Comments, sign-off and requests for changes on these results. A re-run is a new run that needs its own sign-off.'
              : 'Comments, sign-off and requests for changes on these results; they open once the run has finished (reload the page then).'
          }
        />
      </div>
    </>
  );
}
