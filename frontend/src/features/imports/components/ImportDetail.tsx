import { useEffect, useId, useRef, useState, type ReactNode } from 'react';
import { useQueryClient } from '@tanstack/react-query';
import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Button from '@mui/material/Button';
import LinearProgress from '@mui/material/LinearProgress';
import Paper from '@mui/material/Paper';
import Stack from '@mui/material/Stack';
import Typography from '@mui/material/Typography';
import Download from '@mui/icons-material/Download';
import type { ImportStatus, ImportSummary } from '@kinpath/contracts';
import { ConfirmDialog } from '../../../components/ConfirmDialog';
import { useSearchParams } from 'react-router';
import {
  downloadRejectedRows,
  downloadRejections,
  refreshAfterChange,
  useCheckAgain,
  useCommit,
  useDiscard,
  useImport,
  useKeptPreview,
  useRejections,
  useRollback,
} from '../api/imports';
import { apiMessage } from '../../../lib/api-client';
import {
  actionFailure,
  columnsFromSuggestion,
  commitButtonLabel,
  commitConfirmation,
  discardConfirmation,
  leftOutSentence,
  mappingProblems,
  rollbackConfirmation,
  toMapping,
  type FieldColumns,
} from '../messages';
import { ColumnMapping } from './ColumnMapping';
import { KIND_LABELS, dateTime, duration, formatCount, isRunning, rows } from '../words';
import { modelCaughtUp } from './ImportHistory';
import { StatusLabel } from './StatusLabel';
import { ValidationReport } from './ValidationReport';

/** One sentence on where the import stands, announced when it changes. */
export function statusSentence(summary: ImportSummary): string {
  const accepted = summary.rowsAccepted ?? 0;
  const rejected = summary.rowsRejected ?? 0;
  switch (summary.status) {
    case 'queued':
      return summary.rowsTotal === null
        ? 'Waiting for its turn to be checked.'
        : 'Waiting for its turn to be committed.';
    case 'validating':
      return 'Checking every row. Nothing is written yet.';
    case 'validated':
      if (accepted === 0) return `Checked: all ${rows(rejected)} were rejected; nothing to commit.`;
      return rejected === 0
        ? `Checked: all ${rows(accepted)} accepted. Not committed yet.`
        : `Checked: ${rows(accepted)} accepted, ${formatCount(rejected)} rejected. Not committed yet.`;
    case 'committing':
      return 'Committing the accepted rows in one transaction.';
    case 'committed':
      return summary.partial
        ? `Committed ${rows(accepted)}; ${formatCount(rejected)} rejected ${rejected === 1 ? 'row stayed' : 'rows stayed'} out.`
        : `Committed ${rows(accepted)}.`;
    case 'failed':
      return 'Failed; nothing of this import was written.';
    case 'rolled_back':
      return 'Rolled back; the rows it replaced have their earlier values again.';
    case 'discarded':
      return 'Discarded; nothing of this import was written, and its file was removed.';
  }
}

function JobProgress({ summary }: { summary: ImportSummary }) {
  const labelId = useId();
  const { phase, done, total } = summary.progress;
  const committing = summary.status === 'committing' || phase === 'committing';
  const label = `${committing ? 'Committing' : 'Checking'} rows of ${summary.fileName}`;
  if (summary.status === 'queued') {
    return (
      <Box>
        <Typography id={labelId} variant="body2" sx={{ mb: 0.5 }}>
          {summary.fileName} is waiting for its turn
        </Typography>
        <LinearProgress aria-labelledby={labelId} />
      </Box>
    );
  }
  return (
    <Box>
      <Box sx={{ display: 'flex', justifyContent: 'space-between', gap: 2, mb: 0.5 }}>
        <Typography id={labelId} variant="body2">
          {label}
        </Typography>
        <Typography variant="body2" className="kp-figures" aria-hidden>
          {total ? `${formatCount(done)} of ${formatCount(total)}` : `${formatCount(done)} so far`}
        </Typography>
      </Box>
      {total ? (
        <LinearProgress
          variant="determinate"
          value={Math.min(100, Math.round((done / total) * 100))}
          aria-labelledby={labelId}
          aria-valuetext={`${formatCount(done)} of ${formatCount(total)} rows`}
        />
      ) : (
        <LinearProgress
          aria-labelledby={labelId}
          aria-valuetext={`${formatCount(done)} rows so far`}
        />
      )}
    </Box>
  );
}

function Fact({ term, children }: { term: string; children: ReactNode }) {
  return (
    <Box>
      <Typography component="dt" variant="body2" sx={{ color: 'text.secondary' }}>
        {term}
      </Typography>
      <Typography
        component="dd"
        sx={{ m: 0, fontWeight: 700, overflowWrap: 'break-word' }}
        className="kp-figures"
      >
        {children}
      </Typography>
    </Box>
  );
}

function Facts({ summary }: { summary: ImportSummary }) {
  const counted = summary.rowsTotal !== null;
  return (
    <Box
      component="dl"
      sx={{
        m: 0,
        display: 'grid',
        gap: 1.5,
        gridTemplateColumns: 'repeat(auto-fill, minmax(190px, 1fr))',
      }}
    >
      <Fact term="Kind">{KIND_LABELS[summary.kind]}</Fact>
      <Fact term="Rows in file">{counted ? formatCount(summary.rowsTotal ?? 0) : '—'}</Fact>
      <Fact term="Accepted">{counted ? formatCount(summary.rowsAccepted ?? 0) : '—'}</Fact>
      <Fact term="Rejected">{counted ? formatCount(summary.rowsRejected ?? 0) : '—'}</Fact>
      <Fact term="Uploaded">{dateTime(summary.createdAt)}</Fact>
      <Fact term="Uploaded by">{summary.createdBy ?? '—'}</Fact>
      <Fact term="Duration">{duration(summary.durationMs)}</Fact>
      {summary.committedAt ? (
        <>
          <Fact term="Committed">{dateTime(summary.committedAt)}</Fact>
          <Fact term="Committed by">{summary.committedBy ?? '—'}</Fact>
        </>
      ) : null}
      {summary.rolledBackAt ? (
        <>
          <Fact term="Rolled back">{dateTime(summary.rolledBackAt)}</Fact>
          <Fact term="Rolled back by">{summary.rolledBackBy ?? '—'}</Fact>
        </>
      ) : null}
      {summary.discardedAt ? (
        <>
          <Fact term="Discarded">{dateTime(summary.discardedAt)}</Fact>
          <Fact term="Discarded by">{summary.discardedBy ?? '—'}</Fact>
        </>
      ) : null}
      {summary.status === 'committed' || summary.status === 'rolled_back' ? (
        <Fact term="Estimates caught up">{modelCaughtUp(summary)}</Fact>
      ) : null}
    </Box>
  );
}

/** Maps the kept file again and checks it as a new import; this one is then discarded. */
function CheckAgain({ summary, onClose }: { summary: ImportSummary; onClose: () => void }) {
  const preview = useKeptPreview(summary.id, true);
  const checkAgain = useCheckAgain();
  const [, setParams] = useSearchParams();
  const [columns, setColumns] = useState<FieldColumns | null>(null);
  const [tried, setTried] = useState(false);
  useEffect(() => {
    if (!preview.data || columns) return;
    const saved = summary.mapping;
    setColumns(
      saved
        ? Object.fromEntries(
            Object.entries(columnsFromSuggestion(summary.kind, preview.data)).map(([field]) => [
              field,
              Object.keys(saved).find((h) => saved[h] === field) ?? '',
            ]),
          )
        : columnsFromSuggestion(summary.kind, preview.data),
    );
  }, [preview.data, columns, summary]);
  if (preview.isPending) {
    return (
      <Typography role="status" sx={{ color: 'text.secondary' }}>
        Reading the kept file’s header…
      </Typography>
    );
  }
  if (preview.isError || !columns) {
    return (
      <Alert severity="error" role="alert">
        {apiMessage(preview.error) ?? 'The kept file could not be read. Upload the file again.'}
      </Alert>
    );
  }
  const problems = mappingProblems(summary.kind, columns);
  const submit = async () => {
    setTried(true);
    if (Object.keys(problems).length > 0) return;
    try {
      const next = await checkAgain.mutateAsync({ id: summary.id, mapping: toMapping(columns) });
      setParams({ import: next.id });
    } catch {
      // Shown below from the mutation's error.
    }
  };
  return (
    <Stack spacing={1.5}>
      <ColumnMapping
        kind={summary.kind}
        preview={preview.data}
        columns={columns}
        onChange={setColumns}
        problems={tried ? problems : {}}
        differs
      />
      {checkAgain.isError ? (
        <Alert severity="error" role="alert">
          {apiMessage(checkAgain.error) ?? 'The file could not be checked again. Try again.'}
        </Alert>
      ) : null}
      <Box sx={{ display: 'flex', gap: 1.5, flexWrap: 'wrap' }}>
        <Button variant="contained" onClick={submit} loading={checkAgain.isPending}>
          Check again with this mapping
        </Button>
        <Button onClick={onClose}>Cancel</Button>
      </Box>
    </Stack>
  );
}

function Report({ summary }: { summary: ImportSummary }) {
  const headingId = useId();
  const rejections = useRejections(summary.id, true);
  const [downloading, setDownloading] = useState<'report' | 'rows' | null>(null);
  const [downloadError, setDownloadError] = useState<string | null>(null);
  const onDownload = async (what: 'report' | 'rows') => {
    setDownloading(what);
    setDownloadError(null);
    try {
      if (what === 'report') await downloadRejections(summary);
      else await downloadRejectedRows(summary);
    } catch {
      setDownloadError(
        what === 'report'
          ? 'The validation report could not be downloaded. Try again in a moment.'
          : 'The rows to fix could not be downloaded: the uploaded file is kept only until the import is committed or discarded.',
      );
    } finally {
      setDownloading(null);
    }
  };
  return (
    <Box component="section" aria-labelledby={headingId}>
      <Box
        sx={{
          display: 'flex',
          justifyContent: 'space-between',
          alignItems: 'center',
          gap: 2,
          flexWrap: 'wrap',
          mb: 1,
        }}
      >
        <Typography id={headingId} variant="h3">
          Validation report
        </Typography>
        <Box sx={{ display: 'flex', gap: 1, flexWrap: 'wrap' }}>
          {summary.rejectedRowsAvailable ? (
            <Button
              variant="outlined"
              startIcon={<Download aria-hidden />}
              onClick={() => onDownload('rows')}
              loading={downloading === 'rows'}
            >
              Download rows to fix (CSV)
            </Button>
          ) : null}
          <Button
            variant="outlined"
            startIcon={<Download aria-hidden />}
            onClick={() => onDownload('report')}
            loading={downloading === 'report'}
          >
            Download validation report (CSV)
          </Button>
        </Box>
      </Box>
      <Typography variant="body2" sx={{ color: 'text.secondary', mb: 1 }}>
        {summary.rejectedRowsAvailable
          ? 'Rows to fix: the rejected rows in the file’s own columns with a reason column, ready to correct and import again. They are read from the uploaded file, which the server keeps only until this import is committed or discarded. The validation report keeps line, column and reason.'
          : 'The validation report lists line, column, value and reason of each rejected cell; student numbers are never kept in it.'}
      </Typography>
      {downloadError ? (
        <Alert severity="error" role="alert" sx={{ mb: 1 }}>
          {downloadError}
        </Alert>
      ) : null}
      {rejections.isPending ? (
        <Typography role="status" sx={{ color: 'text.secondary' }}>
          Loading the rejected rows…
        </Typography>
      ) : rejections.isError ? (
        <Alert severity="error" role="alert">
          The validation report could not be loaded. Reload the page to try again.
        </Alert>
      ) : (
        <ValidationReport rejections={rejections.data} labelledBy={headingId} />
      )}
    </Box>
  );
}

type Pending = 'commit' | 'rollback' | 'discard' | null;

/** The import chosen on the page: its progress, counts, report, and commit or rollback. */
export function ImportDetail({ id }: { id: string }) {
  const headingId = useId();
  const query = useImport(id);
  const commit = useCommit();
  const rollback = useRollback();
  const discard = useDiscard();
  const queryClient = useQueryClient();
  const [pending, setPending] = useState<Pending>(null);
  const [mappingAgain, setMappingAgain] = useState(false);
  const status: ImportStatus | undefined = query.data?.status;

  // When a job finishes, or the estimates catch up, the history, terms and catalogue are read again.
  const modelRefreshedAt = query.data?.modelRefreshedAt;
  const last = useRef({ status, modelRefreshedAt });
  useEffect(() => {
    const before = last.current;
    const finished = before.status && status && before.status !== status && !isRunning(status);
    const caughtUp = before.status && modelRefreshedAt !== before.modelRefreshedAt;
    if (finished || caughtUp) void refreshAfterChange(queryClient);
    last.current = { status, modelRefreshedAt };
  }, [status, modelRefreshedAt, queryClient]);

  if (query.isPending) {
    return (
      <Typography role="status" sx={{ color: 'text.secondary' }}>
        Loading the import…
      </Typography>
    );
  }
  if (query.isError) {
    return (
      <Alert severity="error" role="alert">
        This import could not be loaded. It may not exist; choose one from the history.
      </Alert>
    );
  }
  const summary = query.data;
  const running = isRunning(summary.status);
  const canCommit = summary.status === 'validated' && (summary.rowsAccepted ?? 0) > 0;
  const canRollback = summary.status === 'committed';
  const canDiscard = summary.status === 'validated';
  const hasReport = !running && (summary.rowsRejected ?? 0) > 0 && summary.status !== 'queued';
  const action = pending === 'commit' ? commit : pending === 'discard' ? discard : rollback;

  const close = () => {
    commit.reset();
    rollback.reset();
    discard.reset();
    setPending(null);
  };
  const confirm = async () => {
    try {
      if (pending === 'commit') await commit.mutateAsync(summary.id);
      else if (pending === 'discard') await discard.mutateAsync(summary.id);
      else await rollback.mutateAsync(summary.id);
      setPending(null);
    } catch {
      // Shown in the dialog from the mutation's error.
    }
  };

  return (
    <Paper
      component="section"
      aria-labelledby={headingId}
      variant="outlined"
      sx={{ p: 2.5, minWidth: 0 }}
    >
      <Stack spacing={2}>
        <Box>
          <Typography id={headingId} variant="h2" sx={{ overflowWrap: 'anywhere' }}>
            {KIND_LABELS[summary.kind]} import: {summary.fileName}
          </Typography>
          <Box sx={{ mt: 1, display: 'flex', gap: 1, alignItems: 'center', flexWrap: 'wrap' }}>
            <StatusLabel summary={summary} />
            {/* Announced on every change of status; progress figures stay on the bar. */}
            <Typography role="status" aria-atomic>
              {statusSentence(summary)}
            </Typography>
          </Box>
        </Box>
        {running ? <JobProgress summary={summary} /> : null}
        {summary.message ? (
          <Alert severity={summary.status === 'failed' ? 'error' : 'warning'}>
            {summary.message}
          </Alert>
        ) : null}
        <Facts summary={summary} />
        {summary.leftOut && leftOutSentence(summary.leftOut) ? (
          <Alert severity="info">{leftOutSentence(summary.leftOut)}</Alert>
        ) : null}
        {canCommit || canRollback || canDiscard ? (
          <Box sx={{ display: 'flex', gap: 1.5, flexWrap: 'wrap' }}>
            {canCommit ? (
              <Button variant="contained" onClick={() => setPending('commit')}>
                {commitButtonLabel(summary)}
              </Button>
            ) : null}
            {canDiscard && !mappingAgain ? (
              <Button variant="outlined" onClick={() => setMappingAgain(true)}>
                Check again with another mapping
              </Button>
            ) : null}
            {canDiscard ? (
              <Button variant="outlined" color="error" onClick={() => setPending('discard')}>
                Discard
              </Button>
            ) : null}
            {canRollback ? (
              <Button variant="outlined" color="error" onClick={() => setPending('rollback')}>
                Roll back this import
              </Button>
            ) : null}
          </Box>
        ) : null}
        {canDiscard && mappingAgain ? (
          <CheckAgain summary={summary} onClose={() => setMappingAgain(false)} />
        ) : null}
        {hasReport ? <Report summary={summary} /> : null}
        {summary.status === 'validated' && (summary.rowsRejected ?? 0) === 0 && canCommit ? (
          <Typography sx={{ color: 'text.secondary' }}>
            Every row passed the checks. Nothing is written until the import is committed.
          </Typography>
        ) : null}
      </Stack>
      <ConfirmDialog
        open={pending !== null}
        title={
          pending === 'rollback'
            ? 'Roll back this import?'
            : pending === 'discard'
              ? 'Discard this import?'
              : 'Commit this import?'
        }
        confirmLabel={
          pending === 'rollback'
            ? 'Roll back'
            : pending === 'discard'
              ? 'Discard'
              : commitButtonLabel(summary)
        }
        tone={pending === 'commit' ? 'primary' : 'error'}
        onConfirm={confirm}
        onCancel={close}
        busy={action.isPending}
        error={action.isError && pending ? actionFailure(action.error, pending) : null}
      >
        {pending === 'rollback'
          ? rollbackConfirmation(summary)
          : pending === 'discard'
            ? discardConfirmation(summary)
            : commitConfirmation(summary)}
      </ConfirmDialog>
    </Paper>
  );
}
