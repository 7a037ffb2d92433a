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
import { compareTerms, isTerm, type HistoryEntry } from '@kinpath/contracts';
import { fixed, plural } from '../format';
import { SortableHeaderCell } from './SortableHeaderCell';

const column = createColumnHelper<HistoryEntry>();

/** Terms in time order (their string order is not), anything malformed last. */
function termOrder(a: string, b: string): number {
  if (isTerm(a) && isTerm(b)) return compareTerms(a, b);
  return isTerm(a) ? -1 : isTerm(b) ? 1 : a.localeCompare(b);
}

const columns = [
  column.accessor('term', {
    header: 'Term',
    sortingFn: (a, b) => termOrder(a.original.term, b.original.term),
    sortDescFirst: true,
  }),
  column.accessor('courseCode', {
    header: 'Course',
    cell: (info) => <span style={{ whiteSpace: 'nowrap' }}>{info.getValue()}</span>,
  }),
  column.accessor('title', { header: 'Title' }),
  column.accessor('grade', { header: 'Grade' }),
  column.accessor((h) => h.gradePoints ?? undefined, {
    id: 'gradePoints',
    header: 'Points',
    sortUndefined: 'last',
    meta: { numeric: true },
    cell: (info) => fixed(info.getValue(), 2),
  }),
  column.accessor((h) => h.satisfaction ?? undefined, {
    id: 'satisfaction',
    header: 'Satisfaction',
    sortUndefined: 'last',
    meta: { numeric: true },
    cell: (info) => fixed(info.getValue(), 0),
  }),
];

/**
 * The course history, grouped by term. Groups follow the term column's order (newest first
 * unless the advisor sorts the terms the other way); other columns sort within each term.
 */
export function HistoryTable({
  history,
  labelledBy,
}: {
  history: HistoryEntry[];
  labelledBy: string;
}) {
  const [sorting, setSorting] = useState<SortingState>([{ id: 'term', desc: true }]);
  const data = useMemo(() => history, [history]);
  const table = useReactTable({
    data,
    columns,
    state: { sorting },
    onSortingChange: setSorting,
    // A header click flips the order; there is always one, so rows never fall back to arrival order.
    enableSortingRemoval: false,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
  });
  const rows = table.getRowModel().rows;
  const termsFirst = sorting[0]?.id === 'term' && sorting[0].desc ? -1 : 1;
  const groups = useMemo(() => {
    const byTerm = new Map<string, typeof rows>();
    for (const row of rows) {
      const list = byTerm.get(row.original.term) ?? [];
      list.push(row);
      byTerm.set(row.original.term, list);
    }
    return [...byTerm.entries()].sort(([a], [b]) => termsFirst * termOrder(a, b));
  }, [rows, termsFirst]);

  return (
    <TableContainer component={Paper} variant="outlined">
      <Table aria-labelledby={labelledBy}>
        <TableHead>
          {table.getHeaderGroups().map((group) => (
            <TableRow key={group.id}>
              {group.headers.map((header) => (
                <SortableHeaderCell key={header.id} header={header} />
              ))}
            </TableRow>
          ))}
        </TableHead>
        {/* One body per term, headed by a row header that names the term for every row in it. */}
        {groups.map(([term, termRows]) => (
          <TableBody key={term}>
            <TableRow sx={{ bgcolor: 'action.hover', breakInside: 'avoid' }}>
              <TableCell
                component="th"
                scope="rowgroup"
                colSpan={columns.length}
                sx={{ fontWeight: 700 }}
              >
                {term} · {plural(termRows.length, 'course')}
              </TableCell>
            </TableRow>
            {termRows.map((row) => (
              <TableRow key={row.id}>
                {row.getVisibleCells().map((cell) => (
                  <TableCell
                    key={cell.id}
                    align={cell.column.columnDef.meta?.numeric ? 'right' : 'left'}
                  >
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </TableCell>
                ))}
              </TableRow>
            ))}
          </TableBody>
        ))}
        {rows.length === 0 ? (
          <TableBody>
            <TableRow>
              <TableCell colSpan={columns.length}>No course attempts on record.</TableCell>
            </TableRow>
          </TableBody>
        ) : null}
      </Table>
    </TableContainer>
  );
}
