import { useMemo, useState } from 'react';
import {
  createColumnHelper,
  getCoreRowModel,
  getFilteredRowModel,
  getSortedRowModel,
  useReactTable,
  type SortingState,
} from '@tanstack/react-table';
import Box from '@mui/material/Box';
import Alert from '@mui/material/Alert';
import TextField from '@mui/material/TextField';
import Typography from '@mui/material/Typography';
import { ROLE_LABELS, type UserAccount } from '@kinpath/contracts';
import { NoMatch } from '../../../components/NoMatch';
import { DataTable } from '../../../components/DataTable';
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
      <DataTable
        table={table}
        labelledBy={captionId}
        hover
        empty={
          users.length === 0 ? (
            'No accounts yet.'
          ) : (
            <NoMatch message="No account matches the filter." onClear={() => setFilter('')} />
          )
        }
      />
    </Box>
  );
}
