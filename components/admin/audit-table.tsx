'use client';
import type { ColumnDef } from '@tanstack/react-table';
import { DataTable } from '@/components/ui/data-table';
import type { AuditDto } from '@/lib/data/dto';

const columns: ColumnDef<AuditDto, unknown>[] = [
  {
    accessorKey: 'createdAt',
    header: 'When (UTC)',
    cell: ({ row }) => (
      <span className="whitespace-nowrap text-ink-600 tabular">
        {row.original.createdAt.replace('T', ' ').slice(0, 19)}
      </span>
    ),
  },
  {
    id: 'who',
    accessorFn: (r) => r.user?.name ?? 'system',
    header: 'Who',
    cell: ({ row }) => row.original.user?.name ?? <span className="text-ink-400">system</span>,
  },
  {
    accessorKey: 'action',
    header: 'Action',
    cell: ({ row }) => <span className="font-mono text-xs text-glass-800">{row.original.action}</span>,
  },
  {
    accessorKey: 'target',
    header: 'Target',
    cell: ({ row }) => <span className="font-mono text-xs">{row.original.target ?? ''}</span>,
  },
  {
    id: 'detail',
    accessorFn: (r) => (r.detail ? JSON.stringify(r.detail) : ''),
    header: 'Detail',
    enableSorting: false,
    cell: ({ getValue }) => (
      <span className="block max-w-xs truncate font-mono text-2xs text-ink-500">{String(getValue() ?? '')}</span>
    ),
  },
];

export function AuditTable({ events }: { events: AuditDto[] }) {
  return (
    <DataTable
      data={events}
      columns={columns}
      label="Audit events"
      filterPlaceholder="Filter by person, action or target"
      initialSort={[{ id: 'createdAt', desc: true }]}
      empty="No events recorded yet."
    />
  );
}
