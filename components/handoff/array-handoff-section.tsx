import { Op } from 'sequelize';
import { ArrayDesign, ArrayRevision, Dataset, EstimateRun } from '@/models';
import type { Caller } from '@/lib/auth';
import { can } from '@/lib/auth/permissions';
import { listReviews } from '@/lib/data/reviews';
import { mayExportDatasets } from '@/lib/handoff/export';
import { storedResults } from '@/lib/handoff/runs';
import { ReviewPanel } from '@/components/review/review-panel';
import { ExportPanel, type RunChoice } from './export-panel';

/**
 * Review, sign-off, export and e-mail hand-off of one array revision: the
 * panels the array page shows under the designer. Server component; reads
 * within the caller's team.
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
  const array = await ArrayDesign.findOne({ where: { id: arrayId, teamId: caller.teamId } });
  const rev = array ? await ArrayRevision.findOne({ where: { arrayId, revision } }) : null;
  if (!array || !rev)
    return (
      <p className="text-sm text-coral-700">
        No array {arrayId} with revision {revision} in your team.
      </p>
    );
  const runs = await EstimateRun.findAll({
    where: { teamId: caller.teamId, arrayRevisionId: rev.id, status: 'done' },
    order: [['id', 'DESC']],
    limit: 20,
  });
  const datasets = await Dataset.findAll({
    where: { id: { [Op.in]: runs.map((r) => r.datasetId as number).filter(Boolean) }, teamId: caller.teamId },
    attributes: ['id', 'name'],
  });
  const choices: RunChoice[] = runs.map((r) => {
    let methods = '';
    try {
      methods = storedResults(r.result)
        .map((m) => m.method)
        .join(', ');
    } catch {
      methods = 'result not readable';
    }
    return {
      id: r.id,
      label: `Run ${r.id} (${methods})`,
      datasetName: datasets.find((d) => d.id === r.datasetId)?.name ?? null,
    };
  });
  const thread = await listReviews({ caller, arrayId, revision });
  return (
    <div className="mt-8 grid gap-6 lg:grid-cols-2" id="handoff">
      <h2 className="text-lg font-semibold lg:col-span-2">
        {array.name}, revision {revision}
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
        runs={choices}
        canSend={can(caller.role, 'arrays.edit')}
        datasetsAllowed={await mayExportDatasets(caller)}
      />
    </div>
  );
}
