'use client';
import Link from 'next/link';
import useSWR from 'swr';
import type { ColumnDef } from '@tanstack/react-table';
import { DataTable } from '@/components/ui/data-table';
import { Badge } from '@/components/ui/badge';
import { FormMessage } from '@/components/ui/field';
import { fetcher } from '@/lib/client/fetcher';
import { clockLabel } from '@/lib/charts/bearing-time';
import { BTR_METHOD_LABELS, type BtrListItem } from './types';

const columns: ColumnDef<BtrListItem, unknown>[] = [
  {
    accessorKey: 'name',
    header: 'Record',
    cell: ({ row }) => (
      <Link className="font-medium text-glass-700 hover:underline" href={`/bearing-time-records/${row.original.id}`}>
        {row.original.name}
      </Link>
    ),
  },
  {
    accessorKey: 'status',
    header: 'Status',
    cell: ({ row }) => (
      <Badge
        tone={
          row.original.status === 'done'
            ? 'teal'
            : row.original.status === 'failed' || row.original.status === 'cancelled'
              ? 'coral'
              : 'amber'
        }
      >
        {row.original.status === 'running'
          ? `running ${Math.round(row.original.progress * 100)} %`
          : row.original.status}
      </Badge>
    ),
  },
  { accessorKey: 'datasetName', header: 'Recording' },
  {
    id: 'duration',
    accessorFn: (r) => r.durationS,
    header: 'Length',
    cell: ({ getValue }) => <span className="tabular">{clockLabel(getValue() as number, 0)}</span>,
  },
  { id: 'band', accessorFn: (r) => `${r.band.lowHz}–${r.band.highHz} Hz`, header: 'Band' },
  { id: 'method', accessorFn: (r) => BTR_METHOD_LABELS[r.method] ?? r.method, header: 'Method' },
  { accessorKey: 'blockCount', header: 'Blocks' },
  {
    id: 'tracks',
    accessorFn: (r) => r.trackCount ?? -1,
    header: 'Tracks',
    cell: ({ row }) => row.original.trackCount ?? '—',
  },
  { accessorKey: 'arrayLabel', header: 'Array' },
  { id: 'by', accessorFn: (r) => r.createdBy?.name ?? '', header: 'By' },
  {
    accessorKey: 'createdAt',
    header: 'Started',
    cell: ({ getValue }) => new Date(String(getValue())).toLocaleString('en-GB'),
  },
];

/** The team's records, polled while any is still running. */
export function RecordsTable() {
  const { data, error } = useSWR<{ items: BtrListItem[] }>('/api/v1/bearing-time-records', fetcher, {
    refreshInterval: (d) => (d?.items.some((r) => r.status === 'queued' || r.status === 'running') ? 1500 : 0),
  });
  if (error && !data) return <FormMessage tone="error">{error.message}</FormMessage>;
  if (!data) return <p className="px-5 py-4 text-sm text-ink-500">Loading…</p>;
  return (
    <DataTable
      data={data.items}
      columns={columns}
      label="Bearing–time records"
      filterPlaceholder="Filter records…"
      empty="No bearing–time records yet."
      initialSort={[{ id: 'createdAt', desc: true }]}
    />
  );
}
