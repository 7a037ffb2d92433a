import { useId, useMemo, useState } from 'react';
import {
  createColumnHelper,
  getCoreRowModel,
  getFilteredRowModel,
  getPaginationRowModel,
  getSortedRowModel,
  useReactTable,
  type ColumnFiltersState,
  type PaginationState,
  type SortingState,
} from '@tanstack/react-table';
import Box from '@mui/material/Box';
import TextField from '@mui/material/TextField';
import Typography from '@mui/material/Typography';
import type { ImportRejection } from '@kinpath/contracts';
import { DataTable } from '../../../components/DataTable';
import { formatCount } from '../words';

/**
 * A reason with its quoted values and line numbers taken out, so that "'Q' is not on the grade
 * scale" and "'Z' is not on the grade scale" fall under one reason when filtering.
 */
export function reasonKind(reason: string): string {
  return reason
    .replace(/'[^']*'/g, '…')
    .replace(/\bline \d+/g, 'line …')
    .trim();
}

const column = createColumnHelper<ImportRejection>();

const columns = [
  column.accessor('line', {
    header: 'Line',
    meta: { numeric: true },
    cell: (info) => formatCount(info.getValue()),
  }),
  column.accessor('column', {
    header: 'Column',
    filterFn: 'equalsString',
    cell: (info) => info.getValue() || '(whole row)',
  }),
  column.accessor('value', {
    header: 'Value',
    enableSorting: false,
    cell: (info) => {
      const value = info.getValue();
      return value === '' ? <em>empty</em> : <Box component="code">{value}</Box>;
    },
  }),
  column.accessor('reason', {
    header: 'Reason',
    enableSorting: false,
    filterFn: (row, id, wanted: string) => reasonKind(row.getValue<string>(id)) === wanted,
  }),
];

const PAGE_SIZE = 25;

/** Every rejected cell with its line, column, value and reason; filterable by column and reason. */
export function ValidationReport({
  rejections,
  labelledBy,
}: {
  rejections: ImportRejection[];
  labelledBy: string;
}) {
  const [sorting, setSorting] = useState<SortingState>([{ id: 'line', desc: false }]);
  const [filters, setFilters] = useState<ColumnFiltersState>([]);
  const [pagination, setPagination] = useState<PaginationState>({
    pageIndex: 0,
    pageSize: PAGE_SIZE,
  });
  const countId = useId();
  const data = useMemo(() => rejections, [rejections]);
  const columnNames = useMemo(
    () => [...new Set(rejections.map((r) => r.column))].sort((a, b) => a.localeCompare(b)),
    [rejections],
  );
  // The commonest reason first: it is usually the one to fix in the export.
  const reasonKinds = useMemo(() => {
    const counts = new Map<string, number>();
    for (const r of rejections) {
      const kind = reasonKind(r.reason);
      counts.set(kind, (counts.get(kind) ?? 0) + 1);
    }
    return [...counts.keys()].sort(
      (a, b) => (counts.get(b) ?? 0) - (counts.get(a) ?? 0) || a.localeCompare(b),
    );
  }, [rejections]);

  const table = useReactTable({
    data,
    columns,
    state: { sorting, columnFilters: filters, pagination },
    onSortingChange: setSorting,
    onPaginationChange: setPagination,
    onColumnFiltersChange: setFilters,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
    getPaginationRowModel: getPaginationRowModel(),
    autoResetPageIndex: false,
  });
  const filterOf = (id: string) => (filters.find((f) => f.id === id)?.value as string) ?? '';
  const setFilter = (id: string, value: string) => {
    table.setPageIndex(0);
    setFilters((current) => [
      ...current.filter((f) => f.id !== id),
      ...(value ? [{ id, value }] : []),
    ]);
  };
  const shown = table.getFilteredRowModel().rows.length;

  return (
    <Box>
      <Box sx={{ display: 'flex', gap: 2, alignItems: 'flex-start', mb: 1.5, flexWrap: 'wrap' }}>
        <TextField
          select
          label="Column"
          value={filterOf('column')}
          onChange={(event) => setFilter('column', event.target.value)}
          sx={{ maxWidth: 220 }}
          slotProps={{ select: { native: true }, inputLabel: { shrink: true } }}
        >
          <option value="">All columns</option>
          {columnNames.map((name) => (
            <option key={name} value={name}>
              {name || '(whole row)'}
            </option>
          ))}
        </TextField>
        <TextField
          select
          label="Reason"
          value={filterOf('reason')}
          onChange={(event) => setFilter('reason', event.target.value)}
          sx={{ maxWidth: 420 }}
          slotProps={{ select: { native: true }, inputLabel: { shrink: true } }}
        >
          <option value="">All reasons</option>
          {reasonKinds.map((kind) => (
            <option key={kind} value={kind}>
              {kind}
            </option>
          ))}
        </TextField>
        <Typography
          id={countId}
          role="status"
          sx={{ color: 'text.secondary', alignSelf: 'center' }}
          className="kp-figures"
        >
          {shown === rejections.length
            ? `${formatCount(rejections.length)} rejected ${rejections.length === 1 ? 'cell' : 'cells'}`
            : `${formatCount(shown)} of ${formatCount(rejections.length)} rejected cells`}
        </Typography>
      </Box>
      <DataTable
        table={table}
        labelledBy={labelledBy}
        scrollable
        // Long values and reasons wrap anywhere, so the report fits its panel and is never cut off.
        sx={{ '& td': { overflowWrap: 'anywhere', verticalAlign: 'top' } }}
        cellSx={(cell) => (cell.column.id === 'reason' ? { minWidth: 160 } : undefined)}
        empty="No rejected cell matches the filters."
      />
    </Box>
  );
}
