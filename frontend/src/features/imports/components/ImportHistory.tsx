import { useMemo, useState } from 'react';
import { Link as RouterLink } from 'react-router';
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
import Link from '@mui/material/Link';
import TextField from '@mui/material/TextField';
import Typography from '@mui/material/Typography';
import { IMPORT_KINDS, type ImportSummary } from '@kinpath/contracts';
import { DataTable } from '../../../components/DataTable';
import { KIND_LABELS, dateTime, duration, formatCount, modelCaughtUpWith } from '../words';
import { StatusLabel } from './StatusLabel';

const column = createColumnHelper<ImportSummary>();

const count = (value: number | null) => (value === null ? '—' : formatCount(value));

/** Whether the estimates were rebuilt after this import changed the term data. */
export function modelCaughtUp(summary: ImportSummary): string {
  if (summary.status !== 'committed' && summary.status !== 'rolled_back') return '—';
  return modelCaughtUpWith(summary) ? `Yes, ${dateTime(summary.modelRefreshedAt)}` : 'Not yet';
}

const columns = [
  column.accessor('createdAt', {
    header: 'Uploaded, by',
    cell: (info) => (
      <>
        <Box component="span" sx={{ display: 'block', whiteSpace: 'nowrap' }}>
          {dateTime(info.getValue())}
        </Box>
        <Box
          component="span"
          sx={{ display: 'block', color: 'text.secondary', fontSize: '0.8rem' }}
        >
          {info.row.original.createdBy ?? 'unknown'}
        </Box>
      </>
    ),
  }),
  column.accessor('kind', {
    header: 'Kind',
    cell: (info) => KIND_LABELS[info.getValue()],
    filterFn: 'equalsString',
  }),
  column.accessor('fileName', {
    header: 'File',
    cell: (info) => (
      <Link
        component={RouterLink}
        to={`?import=${info.row.original.id}`}
        aria-label={`${info.getValue()}, uploaded ${dateTime(info.row.original.createdAt)}`}
        sx={{ overflowWrap: 'break-word' }}
      >
        {info.getValue()}
      </Link>
    ),
  }),
  column.accessor((s) => s.rowsTotal ?? -1, {
    id: 'rowsTotal',
    header: 'Rows',
    cell: (info) => count(info.row.original.rowsTotal),
    meta: { numeric: true },
  }),
  column.accessor((s) => s.rowsAccepted ?? -1, {
    id: 'rowsAccepted',
    header: 'Accepted',
    cell: (info) => count(info.row.original.rowsAccepted),
    meta: { numeric: true },
  }),
  column.accessor((s) => s.rowsRejected ?? -1, {
    id: 'rowsRejected',
    header: 'Rejected',
    cell: (info) => count(info.row.original.rowsRejected),
    meta: { numeric: true },
  }),
  column.accessor('status', {
    header: 'Status',
    cell: (info) => <StatusLabel summary={info.row.original} />,
  }),
  column.accessor((s) => s.durationMs ?? -1, {
    id: 'duration',
    header: 'Duration',
    cell: (info) => duration(info.row.original.durationMs),
    meta: { numeric: true },
  }),
  column.accessor((s) => s.modelRefreshedAt ?? '', {
    id: 'model',
    header: 'Estimates caught up',
    cell: (info) => modelCaughtUp(info.row.original),
  }),
];

const PAGE_SIZE = 20;

/** Every import, newest first: who, when, what, how many rows, and where it stands. */
export function ImportHistory({
  imports,
  labelledBy,
  selectedId,
}: {
  imports: ImportSummary[];
  labelledBy: string;
  selectedId: string | null;
}) {
  const [sorting, setSorting] = useState<SortingState>([{ id: 'createdAt', desc: true }]);
  const [filters, setFilters] = useState<ColumnFiltersState>([]);
  const [pagination, setPagination] = useState<PaginationState>({
    pageIndex: 0,
    pageSize: PAGE_SIZE,
  });
  const data = useMemo(() => imports, [imports]);
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
    getRowId: (row) => row.id,
    autoResetPageIndex: false,
  });
  const kindFilter = (filters.find((f) => f.id === 'kind')?.value as string) ?? '';
  const shown = table.getFilteredRowModel().rows.length;

  return (
    <Box>
      <Box sx={{ display: 'flex', gap: 2, alignItems: 'center', mb: 1.5, flexWrap: 'wrap' }}>
        <TextField
          select
          label="Kind"
          value={kindFilter}
          onChange={(event) => {
            table.setPageIndex(0);
            setFilters(event.target.value ? [{ id: 'kind', value: event.target.value }] : []);
          }}
          sx={{ maxWidth: 220 }}
          slotProps={{ select: { native: true }, inputLabel: { shrink: true } }}
        >
          <option value="">All kinds</option>
          {IMPORT_KINDS.map((kind) => (
            <option key={kind} value={kind}>
              {KIND_LABELS[kind]}
            </option>
          ))}
        </TextField>
        <Typography role="status" sx={{ color: 'text.secondary' }} className="kp-figures">
          {shown === imports.length
            ? `${formatCount(imports.length)} ${imports.length === 1 ? 'import' : 'imports'}`
            : `${formatCount(shown)} of ${formatCount(imports.length)} imports`}
        </Typography>
      </Box>
      <DataTable
        table={table}
        labelledBy={labelledBy}
        scrollable
        sx={{
          '& th, & td': { px: 1 },
          // File names and long messages wrap rather than widen the table past the page.
          '& td': { verticalAlign: 'top', overflowWrap: 'anywhere' },
        }}
        hover
        rowProps={(row) => ({
          selected: row.id === selectedId,
          'aria-current': row.id === selectedId ? 'true' : undefined,
        })}
        cellSx={(cell) =>
          cell.row.id === selectedId && cell.column.id === 'fileName'
            ? { fontWeight: 700 }
            : undefined
        }
        empty="No import of this kind yet."
      />
    </Box>
  );
}
