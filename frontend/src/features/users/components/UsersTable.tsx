import { useMemo, useState } from 'react';
import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  getSortedRowModel,
  useReactTable,
  type SortingState,
} from '@tanstack/react-table';
import Box from '@mui/material/Box';
import Paper from '@mui/material/Paper';
import Table from '@mui/material/Table';
import TableBody from '@mui/material/TableBody';
import TableCell from '@mui/material/TableCell';
import TableContainer from '@mui/material/TableContainer';
import TableHead from '@mui/material/TableHead';
import TableRow from '@mui/material/TableRow';
import TableSortLabel from '@mui/material/TableSortLabel';
import Alert from '@mui/material/Alert';
import TextField from '@mui/material/TextField';
import Typography from '@mui/material/Typography';
import { ROLE_LABELS, type UserAccount } from '@kinpath/contracts';
import { AccountActions } from './AccountActions';

const column = createColumnHelper<UserAccount>();

/** Dates as `YYYY-MM-DD`: unambiguous across locales and they sort as they read. */
function isoDate(value: string): string {
  const date = new Date(value);
  return Number.isNaN(date.getTime()) ? value : date.toISOString().slice(0, 10);
}

function accountStatus(user: UserAccount): string {
  if (user.pendingInvitation) return 'Invitation pending';
  return user.active ? 'Active' : 'Deactivated';
}

const columns = [
  column.accessor('displayName', { header: 'Name' }),
  column.accessor('email', { header: 'E-mail' }),
  column.accessor((user) => ROLE_LABELS[user.role] ?? user.role, { id: 'role', header: 'Role' }),
  column.accessor((user) => user.department ?? '', {
    id: 'department',
    header: 'Department',
    cell: (info) => info.getValue() || '—',
  }),
  column.accessor(accountStatus, {
    id: 'status',
    header: 'Status',
  }),
  column.accessor('createdAt', {
    header: 'Created',
    cell: (info) => isoDate(info.getValue()),
    meta: { numeric: true },
  }),
];

export function UsersTable({ users, captionId }: { users: UserAccount[]; captionId: string }) {
  const [sorting, setSorting] = useState<SortingState>([{ id: 'displayName', desc: false }]);
  const [filter, setFilter] = useState('');
  const [outcome, setOutcome] = useState<{ message: string; error: boolean } | null>(null);
  const data = useMemo(() => users, [users]);
  const allColumns = useMemo(
    () => [
      ...columns,
      column.display({
        id: 'actions',
        header: () => <span>Actions</span>,
        enableSorting: false,
        cell: (info) => (
          <AccountActions
            user={info.row.original}
            onDone={(message, error = false) => setOutcome({ message, error })}
          />
        ),
        meta: { numeric: true },
      }),
    ],
    [],
  );

  const table = useReactTable({
    data,
    columns: allColumns,
    state: { sorting, globalFilter: filter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setFilter,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });
  const rows = table.getRowModel().rows;

  return (
    <Box>
      <Box sx={{ display: 'flex', gap: 2, alignItems: 'center', mb: 1.5, flexWrap: 'wrap' }}>
        <TextField
          label="Filter accounts"
          value={filter}
          onChange={(event) => setFilter(event.target.value)}
          sx={{ maxWidth: 320 }}
          slotProps={{ htmlInput: { type: 'search' } }}
        />
        <Typography role="status" sx={{ color: 'text.secondary' }} className="kp-figures">
          {rows.length === users.length
            ? `${users.length} ${users.length === 1 ? 'account' : 'accounts'}`
            : `${rows.length} of ${users.length} accounts`}
        </Typography>
      </Box>
      {outcome ? (
        <Alert
          severity={outcome.error ? 'error' : 'success'}
          role={outcome.error ? 'alert' : 'status'}
          onClose={() => setOutcome(null)}
          sx={{ mb: 1.5 }}
        >
          {outcome.message}
        </Alert>
      ) : null}
      <TableContainer component={Paper} variant="outlined">
        <Table aria-labelledby={captionId}>
          <TableHead>
            {table.getHeaderGroups().map((group) => (
              <TableRow key={group.id}>
                {group.headers.map((header) => {
                  const sorted = header.column.getIsSorted();
                  const numeric = header.column.columnDef.meta?.numeric;
                  return (
                    <TableCell
                      key={header.id}
                      align={numeric ? 'right' : 'left'}
                      aria-sort={
                        !header.column.getCanSort()
                          ? undefined
                          : sorted === 'asc'
                            ? 'ascending'
                            : sorted === 'desc'
                              ? 'descending'
                              : 'none'
                      }
                    >
                      {header.column.getCanSort() ? (
                        <TableSortLabel
                          active={sorted !== false}
                          direction={sorted === 'desc' ? 'desc' : 'asc'}
                          onClick={header.column.getToggleSortingHandler()}
                        >
                          {flexRender(header.column.columnDef.header, header.getContext())}
                        </TableSortLabel>
                      ) : (
                        flexRender(header.column.columnDef.header, header.getContext())
                      )}
                    </TableCell>
                  );
                })}
              </TableRow>
            ))}
          </TableHead>
          <TableBody>
            {rows.map((row) => (
              <TableRow key={row.id} hover>
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
            {rows.length === 0 ? (
              <TableRow>
                <TableCell colSpan={allColumns.length}>
                  {users.length === 0 ? 'No accounts yet.' : 'No account matches the filter.'}
                </TableCell>
              </TableRow>
            ) : null}
          </TableBody>
        </Table>
      </TableContainer>
    </Box>
  );
}
