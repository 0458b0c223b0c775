import { Card, CardHeader } from '@/components/ui/card';
import { PageHeader } from '@/components/ui/page-header';
import { Refusal } from '@/components/ui/refusal';
import { UploadForm } from '@/components/datasets/upload-form';
import { DatasetsTable } from '@/components/datasets/datasets-table';
import { requirePagePermission } from '@/lib/auth';
import { can } from '@/lib/auth/permissions';
import { listArrayChoices, listDatasets } from '@/lib/data/datasets';
import { maxUploadBytes } from '@/lib/env';

export const metadata = { title: 'Datasets' };
export const dynamic = 'force-dynamic';

export default async function DatasetsPage() {
  const { user, allowed, message } = await requirePagePermission('datasets.read');
  if (!allowed) return <Refusal message={message} />;
  const [rows, arrays] = await Promise.all([listDatasets({ caller: user }), listArrayChoices({ caller: user })]);
  const canUpload = can(user.role, 'datasets.upload');
  return (
    <>
      <PageHeader
        kicker="Trial data"
        title="Datasets"
        description="Multichannel snapshot matrices from trials and test ranges, stored with the SHA-256 of the uploaded bytes so every estimate names the exact data it used."
      />
      {canUpload ? (
        <Card className="mb-6" aria-labelledby="upload-title">
          <CardHeader
            id="upload-title"
            title="Upload a recording"
            description="The file is checked as it arrives; a refused file leaves nothing behind, and the error names the row and column."
          />
          <UploadForm arrays={arrays} maxBytes={maxUploadBytes()} />
        </Card>
      ) : (
        <p className="mb-6 text-sm text-ink-600">
          Your role ({user.role}) can look at datasets; engineers and admins upload them.
        </p>
      )}
      <Card aria-labelledby="list-title">
        <CardHeader id="list-title" title="Your team’s datasets" />
        <DatasetsTable rows={rows} />
      </Card>
    </>
  );
}
