'use client';
import Link from 'next/link';
import type { ColumnDef } from '@tanstack/react-table';
import { DataTable } from '@/components/ui/data-table';
import { useApi } from '@/lib/client/use-api';
import type { ArrayDto } from '@/lib/data/arrays';
import { formatFrequency, formatSpacingInput, formatWhen } from './format';

const columns: ColumnDef<ArrayDto, unknown>[] = [
  {
    accessorKey: 'name',
    header: 'Name',
    cell: ({ row }) => (
      <Link
        href={`/arrays/${row.original.id}`}
        className="font-medium text-glass-700 underline-offset-2 hover:underline"
        data-testid={`array-link-${row.original.id}`}
      >
        {row.original.name}
      </Link>
    ),
  },
  {
    accessorKey: 'elements',
    header: 'Elements',
    cell: ({ row }) => <span className="tabular">{row.original.elements}</span>,
  },
  {
    accessorKey: 'spacingWavelengths',
    header: 'Spacing',
    cell: ({ row }) => (
      <span className="whitespace-nowrap tabular">
        {row.original.spacingWavelengths.toFixed(4)} λ
        {row.original.config.spacing.unit !== 'wavelength' ? (
          <span className="text-ink-500"> ({formatSpacingInput(row.original.config.spacing)})</span>
        ) : null}
      </span>
    ),
  },
  {
    id: 'frequency',
    accessorFn: (r) => r.frequencyHz ?? -1,
    header: 'Frequency',
    cell: ({ row }) => <span className="whitespace-nowrap tabular">{formatFrequency(row.original.frequencyHz)}</span>,
  },
  {
    accessorKey: 'revision',
    header: 'Latest revision',
    cell: ({ row }) => <span className="tabular">r{row.original.revision}</span>,
  },
  {
    id: 'author',
    accessorFn: (r) => r.author?.name ?? '',
    header: 'Saved by',
    cell: ({ row }) => row.original.author?.name ?? <span className="text-ink-400">former member</span>,
  },
  {
    accessorKey: 'revisionCreatedAt',
    header: 'Saved',
    cell: ({ row }) => (
      <span className="whitespace-nowrap text-ink-600 tabular">{formatWhen(row.original.revisionCreatedAt)}</span>
    ),
  },
];

/** The team's arrays: rendered from the server's list, kept fresh with SWR on GET /api/v1/arrays. */
export function ArraysTable({ initial }: { initial: ArrayDto[] }) {
  const { data } = useApi<{ items: ArrayDto[] }>('/api/v1/arrays', { items: initial });
  return (
    <DataTable
      data={data?.items ?? initial}
      columns={columns}
      label="Arrays"
      filterPlaceholder="Filter by name, author or figure"
      initialSort={[{ id: 'revisionCreatedAt', desc: true }]}
      empty="No arrays yet."
    />
  );
}
