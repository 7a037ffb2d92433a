import { useMemo, useState } from 'react';
import {
  createColumnHelper,
  getCoreRowModel,
  getSortedRowModel,
  useReactTable,
  type SortingState,
} from '@tanstack/react-table';
import type { CourseForecast } from '@kinpath/contracts';
import { DataTable } from '../../../components/DataTable';
import { fixed, percent } from '../format';
import { FlagLabel } from './FlagLabel';

const column = createColumnHelper<CourseForecast>();

const FLAG_ORDER = { over_subscribed: 0, at_risk: 1, no_history: 2, balanced: 3 } as const;

const columns = [
  column.accessor('courseCode', { header: 'Course' }),
  column.accessor('title', { header: 'Title' }),
  column.accessor('capacity', {
    header: 'Seats',
    meta: { numeric: true },
    cell: (c) => c.getValue().toFixed(0),
  }),
  column.accessor('expected', {
    header: 'Expected',
    meta: { numeric: true },
    cell: (c) => fixed(c.getValue()),
  }),
  column.accessor((r) => r.high - r.low, {
    id: 'interval',
    header: '80 % interval',
    meta: { numeric: true },
    cell: (c) => `${fixed(c.row.original.low)} – ${fixed(c.row.original.high)}`,
  }),
  column.accessor('utilisation', {
    header: 'Utilisation (% of seats)',
    meta: { numeric: true },
    cell: (c) => percent(c.getValue(), 1),
    sortUndefined: 'last',
  }),
  column.accessor('flag', {
    header: 'Flag',
    cell: (c) => <FlagLabel flag={c.getValue()} />,
    sortingFn: (a, b) => FLAG_ORDER[a.original.flag] - FLAG_ORDER[b.original.flag],
  }),
];

// An interval such as "12.0 – 18.5" stays on one line.
// Tables are tabular already (the theme); each figure stays on one line.
const FIGURES = { whiteSpace: 'nowrap' } as const;

/** The demand outlook per elective: seats, expected demand with its interval, utilisation, flag. */
export function OutlookTable({ rows, caption }: { rows: CourseForecast[]; caption: string }) {
  const [sorting, setSorting] = useState<SortingState>([]);
  const data = useMemo(() => rows, [rows]);
  const table = useReactTable({
    data,
    columns,
    state: { sorting },
    onSortingChange: setSorting,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
  });
  return (
    <DataTable
      table={table}
      caption={caption}
      dense
      rowProps={(row) => ({ 'data-course': row.original.courseCode })}
      cellSx={(cell) => (cell.column.columnDef.meta?.numeric ? FIGURES : undefined)}
    />
  );
}
