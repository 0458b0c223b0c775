'use client';
import type { ColumnDef } from '@tanstack/react-table';
import { DataTable } from '@/components/ui/data-table';

type Row = { snapshot: number; values: { re: number; im: number }[] };

function fmt(re: number, im: number): string {
  const f = (v: number) => (Math.abs(v) >= 1e4 || (Math.abs(v) < 1e-3 && v !== 0) ? v.toExponential(3) : v.toFixed(4));
  return `${f(re)}${im < 0 || Object.is(im, -0) ? '−' : '+'}${f(Math.abs(im))}j`;
}

/** The first snapshots, one row each; sorting a channel column sorts by magnitude. */
export function PreviewTable({ re, im }: { re: number[][]; im: number[][] }) {
  const m = re[0]?.length ?? 0;
  const rows: Row[] = re.map((r, n) => ({ snapshot: n + 1, values: r.map((v, c) => ({ re: v, im: im[n][c] })) }));
  const columns: ColumnDef<Row, unknown>[] = [
    { accessorKey: 'snapshot', header: 'Snapshot' },
    ...Array.from({ length: m }, (_, c): ColumnDef<Row, unknown> => ({
      id: `e${c + 1}`,
      header: `Element ${c + 1}`,
      accessorFn: (r) => Math.hypot(r.values[c].re, r.values[c].im),
      cell: ({ row }) => (
        <span className="font-mono text-xs tabular">{fmt(row.original.values[c].re, row.original.values[c].im)}</span>
      ),
    })),
  ];
  return <DataTable data={rows} columns={columns} label="Snapshot preview" filterPlaceholder="Filter…" />;
}
