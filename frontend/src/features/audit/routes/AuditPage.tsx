import { useId, useMemo, useState } from 'react';
import { useForm } from 'react-hook-form';
import { createColumnHelper, getCoreRowModel, useReactTable } from '@tanstack/react-table';
import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Button from '@mui/material/Button';
import TablePagination from '@mui/material/TablePagination';
import TextField from '@mui/material/TextField';
import Typography from '@mui/material/Typography';
import Download from '@mui/icons-material/Download';
import { auditActionLabel, type AuditEntry } from '@kinpath/contracts';
import { NoMatch } from '../../../components/NoMatch';
import { DataTable } from '../../../components/DataTable';
import { PageHeader } from '../../../components/PageHeader';
import { downloadAuditCsv, useAuditTrail, type AuditFilters } from '../api/audit';

const column = createColumnHelper<AuditEntry>();

/** `YYYY-MM-DD HH:MM:SS` in UTC: sortable, unambiguous, the same for every reader. */
function when(iso: string): string {
  return `${iso.slice(0, 10)} ${iso.slice(11, 19)}`;
}

/** Details as words with spaces, so a long one wraps between values, not inside them. */
function detailText(detail: Record<string, unknown>): string {
  return Object.entries(detail)
    .map(([key, value]) => `${key}: ${valueText(value)}`)
    .join('; ');
}

function valueText(value: unknown): string {
  if (Array.isArray(value)) return value.map(valueText).join(', ');
  if (value && typeof value === 'object') {
    return `(${Object.entries(value)
      .map(([k, v]) => `${k}: ${valueText(v)}`)
      .join(', ')})`;
  }
  return String(value);
}

const columns = [
  column.accessor('at', {
    header: 'When (UTC)',
    cell: (info) => <span className="kp-figures">{when(info.getValue())}</span>,
  }),
  column.accessor((e) => e.actorEmail ?? 'system', { id: 'actor', header: 'Actor' }),
  column.accessor((e) => auditActionLabel(e.action), { id: 'action', header: 'Action' }),
  column.accessor((e) => e.targetLabel ?? e.target ?? '', { id: 'target', header: 'Target' }),
  column.accessor((e) => detailText(e.detail), { id: 'detail', header: 'Detail' }),
];

// Short columns keep their words whole. Actors, targets and details may hold e-mails and ids
// with no space to break at: only those may break inside a word, each keeping room for words.
const SHORT_CELL = { verticalAlign: 'top', whiteSpace: 'nowrap' } as const;
const ID_CELL = { verticalAlign: 'top', overflowWrap: 'anywhere', minWidth: 120 } as const;
const ENTRY_CELL = ID_CELL;
const WIDE_CELL = { ...ID_CELL, minWidth: 220 } as const;
const cellStyle = ({ column: { id } }: { column: { id: string } }) =>
  id === 'at' || id === 'action'
    ? SHORT_CELL
    : id === 'detail'
      ? WIDE_CELL
      : id === 'target'
        ? ID_CELL
        : ENTRY_CELL;

const NO_FILTERS: AuditFilters = { action: '', actor: '', target: '', from: '', to: '' };

export function AuditPage() {
  const headingId = useId();
  const [filters, setFilters] = useState<AuditFilters>(NO_FILTERS);
  const [page, setPage] = useState(0);
  const [pageSize, setPageSize] = useState(50);
  const [exportError, setExportError] = useState<string | null>(null);
  const [exporting, setExporting] = useState(false);
  const trail = useAuditTrail(filters, page + 1, pageSize);
  const { register, handleSubmit, reset } = useForm<AuditFilters>({ defaultValues: NO_FILTERS });

  const data = useMemo(() => trail.data?.items ?? [], [trail.data]);
  // The server filters and pages the trail; sorting one page here would mislead.
  const table = useReactTable({
    data,
    columns,
    enableSorting: false,
    getCoreRowModel: getCoreRowModel(),
  });

  const clearFilters = () => {
    reset(NO_FILTERS);
    setFilters(NO_FILTERS);
    setPage(0);
  };

  const apply = handleSubmit((values) => {
    setFilters(values);
    setPage(0);
  });

  const exportCsv = async () => {
    setExportError(null);
    setExporting(true);
    try {
      await downloadAuditCsv(filters);
    } catch {
      setExportError('The export could not be made. Try again in a moment.');
    } finally {
      setExporting(false);
    }
  };

  return (
    <>
      <PageHeader
        title="Audit trail"
        lead="Who did what, and when: sign-ins, student lookups, imports, settings and account changes."
        actions={
          <Button
            variant="outlined"
            startIcon={<Download aria-hidden />}
            onClick={exportCsv}
            loading={exporting}
          >
            Download CSV
          </Button>
        }
      />
      <Box
        component="form"
        role="search"
        aria-label="Filter the audit trail"
        onSubmit={apply}
        noValidate
        sx={{
          display: 'grid',
          gridTemplateColumns: 'repeat(auto-fill, minmax(190px, 1fr))',
          gap: 2,
          alignItems: 'start',
          mb: 2,
        }}
      >
        <TextField label="Actor (e-mail contains)" {...register('actor')} />
        <TextField
          label="Target contains"
          helperText="E-mail, file name or code"
          {...register('target')}
        />
        <TextField
          select
          label="Action"
          {...register('action')}
          defaultValue=""
          slotProps={{ select: { native: true }, inputLabel: { shrink: true } }}
        >
          <option value="">Every action</option>
          {(trail.data?.actions ?? []).map((action) => (
            <option key={action} value={action}>
              {auditActionLabel(action)}
            </option>
          ))}
        </TextField>
        <TextField
          label="From"
          type="date"
          {...register('from')}
          slotProps={{ inputLabel: { shrink: true } }}
        />
        <TextField
          label="To"
          type="date"
          {...register('to')}
          slotProps={{ inputLabel: { shrink: true } }}
        />
        <Box sx={{ display: 'flex', gap: 1, flexWrap: 'wrap', pt: 1 }}>
          <Button type="submit" variant="contained">
            Apply filters
          </Button>
          <Button onClick={clearFilters}>Clear</Button>
        </Box>
      </Box>
      {exportError ? (
        <Alert severity="error" role="alert" sx={{ mb: 2 }}>
          {exportError}
        </Alert>
      ) : null}
      {trail.isError ? (
        <Alert severity="error" role="alert">
          The audit trail could not be loaded: {''}
          {String(
            (trail.error as { response?: { data?: { message?: unknown } } })?.response?.data
              ?.message ?? 'try again in a moment.',
          )}
        </Alert>
      ) : null}
      <Typography id={headingId} variant="h2" sx={{ mb: 1 }}>
        Entries
      </Typography>
      <Typography role="status" sx={{ color: 'text.secondary', mb: 1 }} className="kp-figures">
        {trail.isPending ? 'Loading the audit trail…' : `${trail.data?.total ?? 0} entries match.`}
      </Typography>
      <DataTable
        table={table}
        labelledBy={headingId}
        dense
        cellSx={cellStyle}
        empty={
          trail.isPending ? undefined : filters === NO_FILTERS ? (
            'The audit trail is empty.'
          ) : (
            <NoMatch message="No entry matches these filters." onClear={clearFilters} />
          )
        }
      />
      <TablePagination
        component="div"
        count={trail.data?.total ?? 0}
        page={page}
        onPageChange={(_, next) => setPage(next)}
        rowsPerPage={pageSize}
        rowsPerPageOptions={[25, 50, 100, 200]}
        onRowsPerPageChange={(event) => {
          setPageSize(Number(event.target.value));
          setPage(0);
        }}
      />
    </>
  );
}
