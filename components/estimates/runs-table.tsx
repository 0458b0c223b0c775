'use client';
import Link from 'next/link';
import type { ColumnDef } from '@tanstack/react-table';
import { DataTable } from '@/components/ui/data-table';
import { Badge } from '@/components/ui/badge';
import { METHOD_LABELS } from './labels';

export type RunRow = {
  id: number;
  status: string;
  createdAt: string;
  methods: string[];
  datasetName: string | null;
  arrayLabel: string;
  bearingsDeg: Record<string, number[]>;
};

const columns: ColumnDef<RunRow, unknown>[] = [
  {
    accessorKey: 'id',
    header: 'Run',
    cell: ({ row }) => (
      <Link className="font-medium text-glass-700 hover:underline" href={`/estimates/${row.original.id}`}>
        #{row.original.id}
      </Link>
    ),
  },
  {
    accessorKey: 'status',
    header: 'Status',
    cell: ({ getValue }) => (
      <Badge tone={getValue() === 'done' ? 'teal' : getValue() === 'failed' ? 'coral' : 'amber'}>
        {String(getValue())}
      </Badge>
    ),
  },
  { accessorKey: 'datasetName', header: 'Dataset', cell: ({ getValue }) => (getValue() as string | null) ?? 'inline' },
  { accessorKey: 'arrayLabel', header: 'Array' },
  { id: 'methods', accessorFn: (r) => r.methods.map((m) => METHOD_LABELS[m] ?? m).join(', '), header: 'Methods' },
  {
    id: 'bearings',
    accessorFn: (r) => {
      const first = r.methods[0];
      const b = first ? r.bearingsDeg[first] : undefined;
      return b ? b.map((x) => `${x.toFixed(2)}°`).join(', ') : '';
    },
    header: 'Bearings (first method)',
  },
  {
    accessorKey: 'createdAt',
    header: 'Started',
    cell: ({ getValue }) => new Date(String(getValue())).toLocaleString('en-GB'),
  },
];

export function RunsTable({ rows }: { rows: RunRow[] }) {
  return (
    <DataTable
      data={rows}
      columns={columns}
      label="Estimate runs"
      filterPlaceholder="Filter runs…"
      empty="No runs yet."
      initialSort={[{ id: 'id', desc: true }]}
    />
  );
}
