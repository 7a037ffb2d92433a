import { useMemo, useState } from 'react';
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
import type { CourseSummary } from '@kinpath/contracts';
import { NoMatch } from '../../../components/NoMatch';
import { DataTable } from '../../../components/DataTable';
import { formatCount } from '../../imports/words';

const column = createColumnHelper<CourseSummary>();

export type ElectiveFilter = '' | 'elective' | 'required';

function columnsFor(creditDecimals: number) {
  return [
    column.accessor('courseCode', {
      header: 'Code',
      cell: (info) => <Box sx={{ whiteSpace: 'nowrap' }}>{info.getValue()}</Box>,
    }),
    column.accessor('title', { header: 'Title' }),
    column.accessor('department', { header: 'Department', filterFn: 'equalsString' }),
    column.accessor((c) => c.credits ?? -1, {
      id: 'credits',
      header: 'Credits',
      cell: (info) => {
        const credits = info.row.original.credits;
        return credits === null ? '—' : credits.toFixed(creditDecimals);
      },
      meta: { numeric: true },
    }),
    column.accessor((c) => c.level ?? '', {
      id: 'level',
      header: 'Level',
      cell: (info) => info.getValue() || '—',
    }),
    column.accessor('elective', {
      header: 'Elective',
      cell: (info) => (info.getValue() ? 'Yes' : 'No'),
      filterFn: (row, id, wanted: ElectiveFilter) =>
        wanted === '' || row.getValue<boolean>(id) === (wanted === 'elective'),
    }),
    column.accessor('prerequisites', {
      header: 'Prerequisites',
      enableSorting: false,
      cell: (info) => info.getValue() || 'None',
    }),
  ];
}

const PAGE_SIZE = 50;

/** The catalogue, filterable by department, electives and a search on code or title. */
export function CoursesTable({
  courses,
  labelledBy,
}: {
  courses: CourseSummary[];
  labelledBy: string;
}) {
  const [sorting, setSorting] = useState<SortingState>([{ id: 'courseCode', desc: false }]);
  const [filters, setFilters] = useState<ColumnFiltersState>([]);
  const [search, setSearch] = useState('');
  const [pagination, setPagination] = useState<PaginationState>({
    pageIndex: 0,
    pageSize: PAGE_SIZE,
  });
  const data = useMemo(() => courses, [courses]);
  const departments = useMemo(
    () => [...new Set(courses.map((c) => c.department))].sort(),
    [courses],
  );
  // Whole credits read as "3"; a catalogue with half credits shows one decimal throughout.
  const columns = useMemo(
    () =>
      columnsFor(courses.some((c) => c.credits !== null && !Number.isInteger(c.credits)) ? 1 : 0),
    [courses],
  );

  const table = useReactTable({
    data,
    columns,
    state: {
      sorting,
      columnFilters: filters,
      globalFilter: search,
      pagination,
    },
    onSortingChange: setSorting,
    onPaginationChange: setPagination,
    onColumnFiltersChange: setFilters,
    onGlobalFilterChange: setSearch,
    globalFilterFn: (row, _id, wanted: string) => {
      const needle = wanted.trim().toLowerCase();
      return (
        row.original.courseCode.toLowerCase().includes(needle) ||
        row.original.title.toLowerCase().includes(needle)
      );
    },
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
      <Box sx={{ display: 'flex', gap: 2, alignItems: 'center', mb: 1.5, flexWrap: 'wrap' }}>
        <TextField
          select
          label="Department"
          value={filterOf('department')}
          onChange={(event) => setFilter('department', event.target.value)}
          sx={{ maxWidth: 180 }}
          slotProps={{ select: { native: true }, inputLabel: { shrink: true } }}
        >
          <option value="">All departments</option>
          {departments.map((code) => (
            <option key={code} value={code}>
              {code}
            </option>
          ))}
        </TextField>
        <TextField
          select
          label="Electives"
          value={filterOf('elective')}
          onChange={(event) => setFilter('elective', event.target.value)}
          sx={{ maxWidth: 220 }}
          slotProps={{ select: { native: true }, inputLabel: { shrink: true } }}
        >
          <option value="">Electives and others</option>
          <option value="elective">Electives only</option>
          <option value="required">Not electives</option>
        </TextField>
        <TextField
          label="Search code or title"
          value={search}
          onChange={(event) => {
            table.setPageIndex(0);
            setSearch(event.target.value);
          }}
          sx={{ maxWidth: 260 }}
          slotProps={{ htmlInput: { type: 'search' } }}
        />
        <Typography role="status" sx={{ color: 'text.secondary' }} className="kp-figures">
          {shown === courses.length
            ? `${formatCount(courses.length)} ${courses.length === 1 ? 'course' : 'courses'}`
            : `${formatCount(shown)} of ${formatCount(courses.length)} courses`}
        </Typography>
      </Box>
      <DataTable
        table={table}
        labelledBy={labelledBy}
        scrollable
        hover
        empty={
          courses.length === 0 ? (
            'The catalogue is empty.'
          ) : (
            <NoMatch
              message="No course matches the filters."
              onClear={() => {
                table.setPageIndex(0);
                setFilters([]);
                setSearch('');
              }}
            />
          )
        }
      />
    </Box>
  );
}
