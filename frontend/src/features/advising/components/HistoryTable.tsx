import { useMemo, useState } from 'react';
import {
  createColumnHelper,
  getCoreRowModel,
  getSortedRowModel,
  useReactTable,
  type SortingState,
} from '@tanstack/react-table';
import { compareTerms, isTerm, type HistoryEntry } from '@kinpath/contracts';
import { DataTable, type RowGroup } from '../../../components/DataTable';
import { fixed, plural } from '../format';

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
    return [...byTerm.entries()]
      .sort(([a], [b]) => termsFirst * termOrder(a, b))
      .map(([term, termRows]): RowGroup<HistoryEntry> => ({
        id: term,
        heading: `${term} · ${plural(termRows.length, 'course')}`,
        rows: termRows,
      }));
  }, [rows, termsFirst]);

  return (
    <DataTable
      table={table}
      labelledBy={labelledBy}
      groups={groups}
      empty="No course attempts on record."
    />
  );
}
