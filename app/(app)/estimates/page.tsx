import { Card, CardHeader } from '@/components/ui/card';
import { PageHeader } from '@/components/ui/page-header';
import { Refusal } from '@/components/ui/refusal';
import { EstimateForm } from '@/components/estimates/estimate-form';
import { RunsTable } from '@/components/estimates/runs-table';
import { requirePagePermission } from '@/lib/auth';
import { can } from '@/lib/auth/permissions';
import { listArrayChoices, listDatasets } from '@/lib/data/datasets';
import { listEstimateRuns } from '@/lib/data/estimates';

export const metadata = { title: 'Estimates' };
export const dynamic = 'force-dynamic';

export default async function EstimatesPage({
  searchParams,
}: {
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const sp = await searchParams;
  const { user, allowed, message } = await requirePagePermission('datasets.read');
  if (!allowed) return <Refusal message={message} />;
  const canRun = can(user.role, 'estimates.run');
  const [datasets, arrays, runs] = await Promise.all([
    listDatasets({ caller: user }),
    can(user.role, 'arrays.read') ? listArrayChoices({ caller: user, allRevisions: true }) : [],
    listEstimateRuns({ caller: user }),
  ]);
  const requested = Number(typeof sp.dataset === 'string' ? sp.dataset : NaN);
  return (
    <>
      <PageHeader
        kicker="Bearings"
        title="Estimates"
        description="Bearings from ESPRIT-family and MUSIC-family methods side by side, each with its Cramér–Rao uncertainty, warnings and resolvability flags. Every run keeps its exact inputs so it can be repeated."
      />
      {canRun ? (
        <Card className="mb-6" aria-labelledby="new-title">
          <CardHeader
            id="new-title"
            title="New estimate"
            description="Runs in the background; the page follows its progress."
          />
          <EstimateForm
            datasets={datasets.map((d) => ({
              id: d.id,
              name: d.name,
              elements: d.elements,
              snapshots: d.snapshots,
              format: d.format,
            }))}
            arrays={arrays}
            initialDatasetId={datasets.some((d) => d.id === requested) ? requested : undefined}
          />
        </Card>
      ) : (
        <p className="mb-6 text-sm text-ink-600">
          Your role ({user.role}) can read runs; engineers and admins start them.
        </p>
      )}
      <Card aria-labelledby="runs-title">
        <CardHeader id="runs-title" title="Runs" />
        <RunsTable rows={runs} />
      </Card>
    </>
  );
}
