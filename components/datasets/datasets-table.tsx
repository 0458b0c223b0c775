'use client';
import Link from 'next/link';
import type { ColumnDef } from '@tanstack/react-table';
import { DataTable } from '@/components/ui/data-table';
import { Badge } from '@/components/ui/badge';
import { formatSize } from './format';

export type DatasetRow = {
  id: number;
  name: string;
  format: string;
  elements: number;
  snapshots: number;
  sha256: string;
  bytes: number;
  uploadedBy: { name: string } | null;
  createdAt: string;
};

const columns: ColumnDef<DatasetRow, unknown>[] = [
  {
    accessorKey: 'name',
    header: 'Name',
    cell: ({ row }) => (
      <Link className="font-medium text-glass-700 hover:underline" href={`/datasets/${row.original.id}`}>
        {row.original.name}
      </Link>
    ),
  },
  {
    accessorKey: 'format',
    header: 'Format',
    cell: ({ getValue }) => <Badge>{String(getValue()).toUpperCase()}</Badge>,
  },
  { accessorKey: 'elements', header: 'Elements (M)' },
  { accessorKey: 'snapshots', header: 'Snapshots (N)' },
  { accessorKey: 'bytes', header: 'Size', cell: ({ getValue }) => formatSize(Number(getValue())) },
  {
    accessorKey: 'sha256',
    header: 'SHA-256',
    cell: ({ getValue }) => <code className="font-mono text-xs">{String(getValue()).slice(0, 12)}…</code>,
  },
  { id: 'uploader', accessorFn: (r) => r.uploadedBy?.name ?? '—', header: 'Uploaded by' },
  {
    accessorKey: 'createdAt',
    header: 'Uploaded',
    cell: ({ getValue }) => new Date(String(getValue())).toLocaleString('en-GB'),
  },
];

export function DatasetsTable({ rows }: { rows: DatasetRow[] }) {
  return (
    <DataTable
      data={rows}
      columns={columns}
      label="Datasets"
      filterPlaceholder="Filter datasets…"
      empty="No datasets yet."
      initialSort={[{ id: 'createdAt', desc: true }]}
    />
  );
}
