'use client';
import Link from 'next/link';
import type { ColumnDef } from '@tanstack/react-table';
import { DataTable } from '@/components/ui/data-table';
import { Badge } from '@/components/ui/badge';
import { METHOD_LABELS, VARIABLE_LABELS } from './labels';

export type StudyRow = {
  id: number;
  name: string;
  status: string;
  progress: number;
  createdAt: string;
  variable: string;
  values: number[];
  methods: string[];
  trials: number;
  arrayLabel: string;
  createdBy: { name: string } | null;
};

const columns: ColumnDef<StudyRow, unknown>[] = [
  {
    accessorKey: 'name',
    header: 'Study',
    cell: ({ row }) => (
      <Link className="font-medium text-glass-700 hover:underline" href={`/studies/${row.original.id}`}>
        {row.original.name}
      </Link>
    ),
  },
  {
    accessorKey: 'status',
    header: 'Status',
    cell: ({ row }) => (
      <Badge tone={row.original.status === 'done' ? 'teal' : row.original.status === 'failed' ? 'coral' : 'amber'}>
        {row.original.status === 'running'
          ? `running ${Math.round(row.original.progress * 100)} %`
          : row.original.status}
      </Badge>
    ),
  },
  {
    id: 'sweep',
    accessorFn: (r) => `${VARIABLE_LABELS[r.variable]?.name ?? r.variable}: ${r.values.join(', ')}`,
    header: 'Sweep',
  },
  { id: 'methods', accessorFn: (r) => r.methods.map((m) => METHOD_LABELS[m] ?? m).join(', '), header: 'Methods' },
  { accessorKey: 'trials', header: 'Trials' },
  { accessorKey: 'arrayLabel', header: 'Array' },
  { id: 'by', accessorFn: (r) => r.createdBy?.name ?? '', header: 'By' },
  {
    accessorKey: 'createdAt',
    header: 'Started',
    cell: ({ getValue }) => new Date(String(getValue())).toLocaleString('en-GB'),
  },
];

export function StudiesTable({ rows }: { rows: StudyRow[] }) {
  return (
    <DataTable
      data={rows}
      columns={columns}
      label="Studies"
      filterPlaceholder="Filter studies…"
      empty="No studies yet."
      initialSort={[{ id: 'createdAt', desc: true }]}
    />
  );
}
