'use client';
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import useSWR from 'swr';
import { Card, CardHeader } from '@/components/ui/card';
import { Button, buttonClass } from '@/components/ui/button';
import { FormMessage } from '@/components/ui/field';
import { ProgressBar } from '@/components/ui/progress-bar';
import { StopButton } from '@/components/jobs/stop-button';
import { apiSend, ClientApiError, fetcher } from '@/lib/client/fetcher';
import { clockLabel } from '@/lib/charts/bearing-time';
import { RecordChart } from './record-chart';
import { TracksTable } from './tracks-table';
import { BlockDetail } from './block-detail';
import { BTR_METHOD_LABELS, type BtrRecord } from './types';

const base = (id: number) => `/api/v1/bearing-time-records/${id}`;

/** A record: progress with Stop while it runs (polled), then the picture, tracks, block detail and exports. */
export function RecordView({ id, canEdit }: { id: number; canEdit: boolean }) {
  const router = useRouter();
  const { data, error, mutate } = useSWR<BtrRecord>(base(id), fetcher, {
    refreshInterval: (d) => (!d || d.status === 'queued' || d.status === 'running' ? 800 : 0),
    // A finished record does not change: no refetch (and redraw) when the window regains focus.
    revalidateOnFocus: false,
  });
  const [selected, setSelected] = useState<number | null>(null);
  const [deleteError, setDeleteError] = useState<string | null>(null);

  if (error && !data) return <FormMessage tone="error">{error.message}</FormMessage>;
  if (!data) return <p className="text-sm text-ink-500">Loading the record…</p>;
  const record = data;
  const running = record.status === 'queued' || record.status === 'running';
  const o = record.inputs?.options ?? {};
  const rec = record.inputs?.recording;
  const method = o.method ?? 'music';
  const rowSeconds = o.blockSeconds ?? 1;
  const done = record.status === 'done' && record.image;

  async function remove() {
    if (!window.confirm(`Delete the bearing–time record "${record.name}"?`)) return;
    try {
      await apiSend('DELETE', base(id));
      router.push('/bearing-time-records');
      router.refresh();
    } catch (err) {
      setDeleteError(err instanceof ClientApiError ? err.message : 'The record could not be deleted.');
    }
  }

  const exportLink = (format: 'csv' | 'json' | 'png', label: string) => (
    <a
      className={buttonClass('secondary')}
      href={`${base(id)}/export?format=${format}`}
      download
      data-testid={`btr-export-${format}`}
    >
      {label}
    </a>
  );

  return (
    <div className="grid min-w-0 gap-6">
      <Card aria-labelledby="inputs-title">
        <CardHeader
          id="inputs-title"
          title={record.name}
          description={`Started by ${record.createdBy?.name ?? 'a former member'} on ${new Date(record.createdAt).toLocaleString('en-GB')}.`}
          actions={
            <div className="flex flex-wrap gap-2">
              {done ? (
                <>
                  {exportLink('csv', 'Export CSV')}
                  {exportLink('json', 'Export JSON')}
                  {exportLink('png', 'Export PNG')}
                </>
              ) : null}
              {canEdit ? (
                <Button variant="danger" onClick={remove}>
                  Delete
                </Button>
              ) : null}
            </div>
          }
        />
        <dl className="grid gap-x-6 gap-y-2 px-5 py-4 text-sm sm:grid-cols-3">
          <div>
            <dt className="text-ink-500">Recording</dt>
            <dd>
              {record.inputs?.dataset?.name ?? `dataset ${record.datasetId ?? '—'}`}
              {rec ? `: ${rec.channels} channels, ${rec.sampleRate} Hz, ${clockLabel(rec.durationS)}` : ''}
            </dd>
          </div>
          <div>
            <dt className="text-ink-500">Array</dt>
            <dd>
              {record.inputs?.array?.name
                ? `${record.inputs.array.name}${record.inputs.array.revision ? ` r${record.inputs.array.revision}` : ''}, `
                : ''}
              M = {o.elements ?? '—'}, d = {o.spacingM !== undefined ? `${Number(o.spacingM.toPrecision(4))} m` : '—'},
              c = {o.propagationSpeedMps !== undefined ? Number(o.propagationSpeedMps.toPrecision(5)) : '—'} m/s
            </dd>
          </div>
          <div>
            <dt className="text-ink-500">Band and method</dt>
            <dd>
              {o.band ? `${o.band.lowHz}–${o.band.highHz} Hz` : '—'}, {BTR_METHOD_LABELS[method] ?? method}
              {o.bearingEstimator ? ` (${o.bearingEstimator})` : ''}
            </dd>
          </div>
          <div>
            <dt className="text-ink-500">Blocks</dt>
            <dd>
              {o.blockSeconds ?? '—'} s, {Math.round(100 * (o.blockOverlap ?? 0))} % overlap
              {record.summary?.blockCount !== undefined
                ? `, ${record.summary.blockCount}`
                : record.inputs?.blockCount !== undefined
                  ? `, ${record.inputs.blockCount}`
                  : ''}
            </dd>
          </div>
          <div>
            <dt className="text-ink-500">STFT</dt>
            <dd>
              {o.fftLength ?? '—'}-point {o.window ?? 'hann'}, hop {o.hop ?? o.fftLength ?? '—'}
              {record.summary?.framesPerBlock ? `, ${record.summary.framesPerBlock} frames per block` : ''}
            </dd>
          </div>
          <div>
            <dt className="text-ink-500">Sources per block</dt>
            <dd>
              {o.sourceCount !== undefined
                ? `K = ${o.sourceCount} (given)`
                : `${(o.sourceCountRule ?? 'mdl').toUpperCase()} per bin, median`}
              {record.summary?.bins
                ? `; ${record.summary.bins.count} bins${record.summary.bins.excludedBins ? `, ${record.summary.bins.excludedBins} above half-wavelength spacing left out` : ''}${record.summary.bins.gratingLobeBins ? `, ${record.summary.bins.gratingLobeBins} with grating lobes` : ''}`
                : ''}
            </dd>
          </div>
        </dl>
        {deleteError ? (
          <div className="px-5 pb-4">
            <FormMessage tone="error">{deleteError}</FormMessage>
          </div>
        ) : null}
      </Card>

      {running ? (
        <Card aria-labelledby="progress-title">
          <CardHeader
            id="progress-title"
            title={record.status === 'queued' ? 'Queued' : 'Running'}
            description="Blocks are analysed in the background; this page follows them."
            actions={
              canEdit ? (
                <StopButton url={`${base(id)}/cancel`} label="Stop this record" onStopped={() => void mutate()} />
              ) : null
            }
          />
          <div className="px-5 py-4">
            <ProgressBar fraction={record.progress} label="Record progress" />
            <p className="mt-2 text-sm text-ink-600 tabular">{Math.round(record.progress * 100)} %</p>
          </div>
        </Card>
      ) : null}
      {record.status === 'failed' ? (
        <FormMessage tone="error">{record.error ?? 'The record failed.'}</FormMessage>
      ) : null}
      {record.status === 'cancelled' ? (
        <FormMessage tone="error">{record.error ?? 'The record was stopped.'}</FormMessage>
      ) : null}
      {record.summary?.warnings?.length ? (
        <FormMessage tone="warn">{record.summary.warnings.map((w) => w.message).join(' ')}</FormMessage>
      ) : null}

      {done && record.image ? (
        <>
          <Card aria-labelledby="record-title">
            <CardHeader
              id="record-title"
              title="Bearing–time record"
              description={`Each row is one block's wideband spectrum, normalised to its own peak; bearing from broadside across, time down. Lines are the tracks; dots are the block bearings.${record.summary?.elapsedMs ? ` Computed in ${(record.summary.elapsedMs / 1000).toFixed(1)} s.` : ''}`}
            />
            <div className="px-5 py-4">
              <RecordChart
                image={record.image}
                blocks={record.blocks}
                tracks={record.tracks}
                rowSeconds={rowSeconds}
                selectedBlock={selected}
                onSelectBlock={setSelected}
              />
            </div>
          </Card>
          <Card aria-labelledby="block-title">
            <CardHeader
              id="block-title"
              title={selected === null ? 'Block detail' : `Block ${selected + 1} of ${record.blocks.length}`}
              description="Click a row of the record to see that block's wideband spectrum and its bearings ±1σ."
            />
            <div className="px-5 py-4">
              {selected === null ? (
                <p className="text-sm text-ink-500">No block chosen yet.</p>
              ) : (
                <BlockDetail recordId={id} index={selected} method={method} />
              )}
            </div>
          </Card>
          <Card aria-labelledby="tracks-title">
            <CardHeader
              id="tracks-title"
              title="Tracks"
              description="Block bearings associated by nearest-neighbour gating with an α–β filter. Times are block centres; the rate is the least-squares slope of the track's measured bearings."
            />
            <TracksTable tracks={record.tracks} />
          </Card>
        </>
      ) : null}

      <aside
        className="rounded-card border border-amber-200 bg-amber-50 px-5 py-4 text-sm text-amber-900"
        aria-label="Caution"
      >
        <p className="font-semibold">Read this record with care</p>
        <ul className="mt-1 list-disc space-y-1 pl-5">
          <li>
            Bearings and tracks are advisory. A line array cannot tell left from right: every bearing has a mirror on
            the other side of the line.
          </li>
          <li>
            ±1σ is a Cramér–Rao bound for the ideal model; below threshold SNR, with calibration or position errors,
            multipath or sources closer than the array can resolve, real errors are larger and tracks can swap or break.
          </li>
          <li>Levels are relative (each row normalised to its peak), not calibrated sound pressure.</li>
        </ul>
      </aside>
    </div>
  );
}
