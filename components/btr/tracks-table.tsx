'use client';
import type { ColumnDef } from '@tanstack/react-table';
import { DataTable } from '@/components/ui/data-table';
import { clockLabel, trackColour } from '@/lib/charts/bearing-time';
import type { BtrTrack } from './types';

type Row = {
  id: number;
  colour: string;
  startS: number;
  endS: number;
  durationS: number;
  startDeg: number;
  endDeg: number;
  rateDegPerMin: number;
  points: number;
};

const num = (digits: number, unit = '') => {
  const NumberCell = ({ getValue }: { getValue: () => unknown }) => {
    const v = getValue() as number;
    return <span className="tabular">{Number.isFinite(v) ? `${v.toFixed(digits)}${unit}` : '—'}</span>;
  };
  return NumberCell;
};

const clock = ({ getValue }: { getValue: () => unknown }) => (
  <span className="tabular">{clockLabel(getValue() as number)}</span>
);

const columns: ColumnDef<Row, unknown>[] = [
  {
    accessorKey: 'id',
    header: 'Track',
    cell: ({ row }) => (
      <span className="inline-flex items-center gap-2 font-medium" data-testid={`track-row-${row.original.id}`}>
        <span
          aria-hidden
          className="inline-block h-1 w-5 rounded"
          style={{ background: row.original.colour, boxShadow: '0 0 0 1px rgba(17,28,40,0.45)' }}
        />
        {row.original.id}
      </span>
    ),
  },
  { accessorKey: 'startS', header: 'Start (m:ss)', cell: clock },
  { accessorKey: 'endS', header: 'End (m:ss)', cell: clock },
  { accessorKey: 'durationS', header: 'Duration (s)', cell: num(1) },
  { accessorKey: 'startDeg', header: 'Bearing at start', cell: num(2, '°') },
  { accessorKey: 'endDeg', header: 'Bearing at end', cell: num(2, '°') },
  { accessorKey: 'rateDegPerMin', header: 'Mean rate (°/min)', cell: num(2) },
  { accessorKey: 'points', header: 'Points' },
];

/** The record's tracks, sortable and filterable: start, end, bearings there, mean bearing rate. */
export function TracksTable({ tracks }: { tracks: BtrTrack[] }) {
  const rows: Row[] = tracks.map((t, i) => {
    const first = t.start ?? t.points[0];
    const last = t.end ?? t.points[t.points.length - 1];
    return {
      id: t.id,
      colour: trackColour(i),
      startS: t.startS,
      endS: t.endS,
      durationS: t.endS - t.startS,
      startDeg: first?.bearingDeg ?? Number.NaN,
      endDeg: last?.bearingDeg ?? Number.NaN,
      rateDegPerMin: 60 * t.meanRateDegPerS,
      points: t.points.length,
    };
  });
  return (
    <DataTable
      data={rows}
      columns={columns}
      label="Tracks"
      filterPlaceholder="Filter tracks…"
      initialSort={[{ id: 'startS', desc: false }]}
      empty="No tracks: no bearing was held for the tracker's confirmation count."
    />
  );
}
