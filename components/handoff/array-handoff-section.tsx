import type { Caller } from '@/lib/auth';
import { can } from '@/lib/auth/permissions';
import { getArrayHandoffPanel } from '@/lib/data/bundles';
import { listReviews } from '@/lib/data/reviews';
import { ReviewPanel } from '@/components/review/review-panel';
import { ExportPanel } from './export-panel';

/**
 * Review, sign-off, export and e-mail hand-off of one array revision: the
 * panels the array page shows under the designer. Server component; reads
 * within the caller's team through lib/data.
 */
export async function ArrayHandoffSection({
  caller,
  arrayId,
  revision,
}: {
  caller: Caller;
  arrayId: number;
  revision: number;
}) {
  const panel = await getArrayHandoffPanel({ caller, arrayId, revision });
  if (!panel)
    return (
      <p className="text-sm text-coral-700">
        No array {arrayId} with revision {revision} in your team.
      </p>
    );
  const thread = await listReviews({ caller, arrayId, revision });
  return (
    <div className="mt-8 grid gap-6 lg:grid-cols-2" id="handoff">
      <h2 className="text-lg font-semibold lg:col-span-2">
        {panel.arrayName}, revision {revision}
      </h2>
      <ReviewPanel
        initial={thread}
        target={{ arrayId, revision }}
        canComment={can(caller.role, 'review.comment')}
        canApprove={can(caller.role, 'review.approve')}
        title={`Review of revision ${revision}`}
      />
      <ExportPanel
        arrayId={arrayId}
        revision={revision}
        runs={panel.runs}
        canSend={can(caller.role, 'arrays.edit')}
        datasetsAllowed={panel.datasetsAllowed}
      />
    </div>
  );
}
