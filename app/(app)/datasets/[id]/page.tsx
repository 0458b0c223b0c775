import Link from 'next/link';
import { notFound } from 'next/navigation';
import { Card, CardHeader } from '@/components/ui/card';
import { PageHeader } from '@/components/ui/page-header';
import { Refusal } from '@/components/ui/refusal';
import { Badge } from '@/components/ui/badge';
import { buttonClass } from '@/components/ui/button';
import { ChannelPowerChart, CovarianceHeatmap, EigenvalueChart } from '@/components/datasets/figures';
import { PreviewTable } from '@/components/datasets/preview-table';
import { DeleteDatasetButton } from '@/components/datasets/delete-button';
import { formatSize } from '@/components/datasets/format';
import { ApiError } from '@/lib/http';
import { requirePagePermission } from '@/lib/auth';
import { can } from '@/lib/auth/permissions';
import { getDataset } from '@/lib/data/datasets';

export const dynamic = 'force-dynamic';

export default async function DatasetPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const { user, allowed, message } = await requirePagePermission('datasets.read');
  if (!allowed) return <Refusal message={message} />;
  if (!/^[1-9][0-9]{0,15}$/.test(id)) notFound();
  let d;
  try {
    d = await getDataset({ caller: user, id: Number(id) });
  } catch (err) {
    if (err instanceof ApiError && err.status === 404) notFound();
    throw err;
  }
  const s = d.summary;
  const details = d.details as Record<string, unknown> | null;
  return (
    <>
      <PageHeader
        kicker="Dataset"
        title={d.name}
        description={`${d.originalName} · uploaded by ${d.uploadedBy?.name ?? 'a former member'} on ${new Date(d.createdAt).toLocaleString('en-GB')}`}
        actions={
          <>
            {can(user.role, 'estimates.run') ? (
              <Link className={buttonClass('primary')} href={`/estimates?dataset=${d.id}`}>
                Estimate bearings
              </Link>
            ) : null}
            {can(user.role, 'datasets.upload') ? <DeleteDatasetButton id={d.id} name={d.name} /> : null}
          </>
        }
      />
      <Card className="mb-6" aria-labelledby="facts-title">
        <CardHeader id="facts-title" title="Shape and provenance" />
        <dl className="grid gap-x-6 gap-y-3 px-5 py-4 text-sm sm:grid-cols-3">
          <Fact label="Format">
            <Badge tone="teal">{d.format.toUpperCase()}</Badge>
          </Fact>
          <Fact label="Shape">
            {d.snapshots} snapshots × {d.elements} elements
          </Fact>
          <Fact label="Size">{formatSize(d.bytes)}</Fact>
          <Fact label="SHA-256 of the uploaded bytes" wide>
            <code className="font-mono text-xs break-all" data-testid="sha256">
              {d.sha256}
            </code>
          </Fact>
          <Fact label="Uploaded by">{d.uploadedBy?.name ?? '—'}</Fact>
          {details?.kind === 'wav' ? (
            <Fact label="STFT">
              {String(details.frequencyHz)} Hz → bin {String(details.bin)} ({Number(details.binFrequencyHz).toFixed(2)}{' '}
              Hz), L = {String(details.fftLength)}, hop {String(details.hop)}, {String(details.window)}
            </Fact>
          ) : null}
          {details?.kind === 'hdf5' ? (
            <Fact label="HDF5 dataset">
              {String(details.datasetPath)} ({String(details.storage)})
            </Fact>
          ) : null}
          {details?.kind === 'npy' ? (
            <Fact label="NPY">
              dtype {String(details.dtype)}, {details.fortranOrder ? 'Fortran' : 'C'} order, version{' '}
              {String(details.version)}
            </Fact>
          ) : null}
          {details?.kind === 'csv' && Array.isArray(details.header) ? (
            <Fact label="CSV header">{(details.header as string[]).join(', ')}</Fact>
          ) : null}
        </dl>
      </Card>
      {s ? (
        <>
          <div className="mb-6 grid gap-6 lg:grid-cols-2">
            <Card aria-labelledby="power-title">
              <CardHeader id="power-title" title="Power per channel" />
              <div className="px-5 py-4">
                <ChannelPowerChart powerDb={s.channelPowerDb} />
              </div>
            </Card>
            <Card aria-labelledby="cov-title">
              <CardHeader id="cov-title" title="Covariance magnitude |R|" />
              <div className="px-5 py-4">
                {s.covarianceMagnitude ? (
                  <CovarianceHeatmap magnitude={s.covarianceMagnitude} />
                ) : (
                  <p className="text-sm text-ink-500">Not drawn above 128 elements.</p>
                )}
              </div>
            </Card>
          </div>
          <Card className="mb-6" aria-labelledby="eig-title">
            <CardHeader
              id="eig-title"
              title="Eigenvalues of the sample covariance"
              description="R = X·Xᴴ/N over all snapshots; the source-count rules as the estimator applies them."
            />
            <div className="px-5 py-4">
              <EigenvalueChart
                eigenvalues={s.eigenvalues}
                mdl={s.mdl}
                aic={s.aic}
                mdlChoice={s.mdlChoice}
                aicChoice={s.aicChoice}
              />
            </div>
          </Card>
          <Card aria-labelledby="preview-title">
            <CardHeader
              id="preview-title"
              title={`First ${s.preview.re.length} snapshots`}
              description="Sort a column to order by magnitude."
            />
            <PreviewTable re={s.preview.re} im={s.preview.im} />
          </Card>
        </>
      ) : null}
    </>
  );
}

function Fact({ label, children, wide }: { label: string; children: React.ReactNode; wide?: boolean }) {
  return (
    <div className={wide ? 'sm:col-span-2' : undefined}>
      <dt className="text-2xs font-medium tracking-wide text-ink-500 uppercase">{label}</dt>
      <dd className="mt-0.5 text-ink-900">{children}</dd>
    </div>
  );
}
