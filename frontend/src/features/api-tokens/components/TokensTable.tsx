import { useMemo, useState } from 'react';
import {
  createColumnHelper,
  getCoreRowModel,
  getSortedRowModel,
  useReactTable,
  type SortingState,
} from '@tanstack/react-table';
import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Button from '@mui/material/Button';
import type { ApiTokenSummary } from '@kinpath/contracts';
import { ConfirmDialog } from '../../../components/ConfirmDialog';
import { DataTable } from '../../../components/DataTable';
import { apiMessage } from '../../../lib/api-client';
import { useRevokeApiToken } from '../api/api-tokens';

const column = createColumnHelper<ApiTokenSummary>();

/** Dates as `YYYY-MM-DD`: unambiguous across locales and they sort as they read. */
function isoDate(value: string | null): string {
  return value ? new Date(value).toISOString().slice(0, 10) : '—';
}

/** The last day a token works: its expiry is the end of that day (UTC). */
function lastDay(expiresAt: string): string {
  return new Date(new Date(expiresAt).getTime() - 1).toISOString().slice(0, 10);
}

const STATE_LABELS: Record<ApiTokenSummary['state'], string> = {
  active: 'Active',
  expired: 'Expired',
  revoked: 'Revoked',
};

function RevokeButton({
  token,
  onDone,
}: {
  token: ApiTokenSummary;
  onDone: (message: string) => void;
}) {
  const [open, setOpen] = useState(false);
  const revoke = useRevokeApiToken();
  if (token.state === 'revoked') return null;
  return (
    <>
      <Button
        size="small"
        color="error"
        aria-label={`Revoke ${token.name}`}
        onClick={() => setOpen(true)}
      >
        Revoke
      </Button>
      <ConfirmDialog
        open={open}
        title={`Revoke “${token.name}”?`}
        confirmLabel="Revoke token"
        tone="error"
        busy={revoke.isPending}
        error={revoke.isError ? (apiMessage(revoke.error) ?? 'The token was not revoked.') : null}
        onCancel={() => {
          revoke.reset();
          setOpen(false);
        }}
        onConfirm={() =>
          revoke.mutate(token.id, {
            onSuccess: () => {
              setOpen(false);
              onDone(`“${token.name}” is revoked; scripts using it are refused from now on.`);
            },
          })
        }
      >
        Scripts using this token are refused from their next request. This cannot be undone: a new
        token would need a new secret in the script.
      </ConfirmDialog>
    </>
  );
}

export function TokensTable({
  tokens,
  labelledBy,
}: {
  tokens: ApiTokenSummary[];
  labelledBy: string;
}) {
  const [sorting, setSorting] = useState<SortingState>([{ id: 'createdAt', desc: true }]);
  const [outcome, setOutcome] = useState<string | null>(null);
  const columns = useMemo(
    () => [
      column.accessor('name', { header: 'Name' }),
      column.accessor('ownerEmail', { header: 'Acts as' }),
      column.accessor((token) => token.scopes.join(', '), { id: 'scopes', header: 'Scopes' }),
      column.accessor('createdAt', {
        header: 'Created',
        cell: (info) => isoDate(info.getValue()),
        meta: { numeric: true },
      }),
      column.accessor('expiresAt', {
        header: 'Last day',
        cell: (info) => lastDay(info.getValue()),
        meta: { numeric: true },
      }),
      column.accessor('lastUsedAt', {
        header: 'Last used',
        cell: (info) => isoDate(info.getValue()),
        meta: { numeric: true },
      }),
      column.accessor((token) => STATE_LABELS[token.state], { id: 'state', header: 'State' }),
      column.display({
        id: 'actions',
        header: () => <span>Actions</span>,
        enableSorting: false,
        cell: (info) => <RevokeButton token={info.row.original} onDone={setOutcome} />,
        meta: { numeric: true },
      }),
    ],
    [],
  );
  const table = useReactTable({
    data: tokens,
    columns,
    state: { sorting },
    onSortingChange: setSorting,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
  });
  return (
    <Box>
      {outcome ? (
        <Alert severity="success" role="status" onClose={() => setOutcome(null)} sx={{ mb: 1.5 }}>
          {outcome}
        </Alert>
      ) : null}
      <DataTable
        table={table}
        labelledBy={labelledBy}
        hover
        scrollable
        empty="No script tokens yet. Create one for each script that sends files."
      />
    </Box>
  );
}
