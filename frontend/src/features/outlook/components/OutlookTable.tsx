import { useMemo, useState } from 'react';
import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  getSortedRowModel,
  useReactTable,
  type SortingState,
} from '@tanstack/react-table';
import Paper from '@mui/material/Paper';
import Table from '@mui/material/Table';
import TableBody from '@mui/material/TableBody';
import TableCell from '@mui/material/TableCell';
import TableContainer from '@mui/material/TableContainer';
import TableHead from '@mui/material/TableHead';
import TableRow from '@mui/material/TableRow';
import type { CourseForecast } from '@kinpath/contracts';
import { SortableHeaderCell } from '../../advising/components/SortableHeaderCell';
import { fixed, percent } from '../format';
import { FlagLabel } from './FlagLabel';

const column = createColumnHelper<CourseForecast>();

const FLAG_ORDER = { over_subscribed: 0, at_risk: 1, balanced: 2 } as const;

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
    header: 'Utilisation',
    meta: { numeric: true },
    cell: (c) => percent(c.getValue()),
    sortUndefined: 'last',
  }),
  column.accessor('flag', {
    header: 'Flag',
    cell: (c) => <FlagLabel flag={c.getValue()} />,
    sortingFn: (a, b) => FLAG_ORDER[a.original.flag] - FLAG_ORDER[b.original.flag],
  }),
];

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
    <TableContainer component={Paper} variant="outlined">
      <Table size="small">
        <caption style={{ captionSide: 'top', textAlign: 'left' }}>{caption}</caption>
        <TableHead>
          {table.getHeaderGroups().map((group) => (
            <TableRow key={group.id}>
              {group.headers.map((header) => (
                <SortableHeaderCell key={header.id} header={header} />
              ))}
            </TableRow>
          ))}
        </TableHead>
        <TableBody>
          {table.getRowModel().rows.map((row) => (
            <TableRow key={row.id} data-course={row.original.courseCode}>
              {row.getVisibleCells().map((cell) => (
                <TableCell
                  key={cell.id}
                  align={cell.column.columnDef.meta?.numeric ? 'right' : 'left'}
                  sx={
                    cell.column.columnDef.meta?.numeric
                      ? { fontVariantNumeric: 'tabular-nums', whiteSpace: 'nowrap' }
                      : undefined
                  }
                >
                  {flexRender(cell.column.columnDef.cell, cell.getContext())}
                </TableCell>
              ))}
            </TableRow>
          ))}
        </TableBody>
      </Table>
    </TableContainer>
  );
}
