import Link from 'next/link';
import { Card, CardHeader } from '@/components/ui/card';
import { PageHeader } from '@/components/ui/page-header';
import { Refusal } from '@/components/ui/refusal';
import { RecordForm, type RecordingChoice } from '@/components/btr/record-form';
import { requirePagePermission } from '@/lib/auth';
import { getDataset, listArrayChoices, listDatasets } from '@/lib/data/datasets';

export const metadata = { title: 'New bearing–time record' };
export const dynamic = 'force-dynamic';

export default async function NewBearingTimeRecordPage({
  searchParams,
}: {
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const sp = await searchParams;
  const { user, allowed, message } = await requirePagePermission('estimates.run');
  if (!allowed) return <Refusal message={message} />;
  const [datasets, arrays] = await Promise.all([listDatasets({ caller: user }), listArrayChoices({ caller: user })]);
  // Time series: WAV recordings (rate in the header) and real NPY arrays (rate typed in the form).
  const recordings: RecordingChoice[] = [];
  for (const d of datasets.filter((x) => x.format === 'wav' || x.format === 'npy')) {
    const full = await getDataset({ caller: user, id: d.id });
    const details = (full.details ?? {}) as { sampleRate?: number; samplesPerChannel?: number; dtype?: string };
    if (d.format === 'npy' && details.dtype?.includes('c')) continue; // complex snapshots, not a recording
    const sampleRate = typeof details.sampleRate === 'number' ? details.sampleRate : null;
    recordings.push({
      id: d.id,
      name: d.name,
      format: d.format,
      channels: d.elements,
      arrayId: d.arrayId,
      sampleRate,
      durationS:
        sampleRate && typeof details.samplesPerChannel === 'number' ? details.samplesPerChannel / sampleRate : null,
    });
  }
  const requested = Number(typeof sp.dataset === 'string' ? sp.dataset : NaN);
  return (
    <>
      <PageHeader
        kicker="Bearing–time records"
        title="New record"
        description={
          <>
            Cut a long recording into blocks, average the narrowband spectra of every bin in the band into one row per
            block, estimate each block&apos;s bearings with ±1σ, and join them into tracks. Each parameter says what it
            does and its default.{' '}
            <Link className="text-glass-700 hover:underline" href="/bearing-time-records">
              All records
            </Link>
          </>
        }
      />
      <Card aria-labelledby="form-title">
        <CardHeader id="form-title" title="Recording and analysis" />
        <RecordForm
          recordings={recordings}
          arrays={arrays}
          initialDatasetId={recordings.some((r) => r.id === requested) ? requested : undefined}
        />
      </Card>
    </>
  );
}
