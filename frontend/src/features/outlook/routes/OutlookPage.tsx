import { useId, useMemo, useState } from 'react';
import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Button from '@mui/material/Button';
import LinearProgress from '@mui/material/LinearProgress';
import MenuItem from '@mui/material/MenuItem';
import Stack from '@mui/material/Stack';
import Tab from '@mui/material/Tab';
import Tabs from '@mui/material/Tabs';
import TextField from '@mui/material/TextField';
import Typography from '@mui/material/Typography';
import Paper from '@mui/material/Paper';
import Table from '@mui/material/Table';
import TableBody from '@mui/material/TableBody';
import TableCell from '@mui/material/TableCell';
import TableContainer from '@mui/material/TableContainer';
import TableHead from '@mui/material/TableHead';
import TableRow from '@mui/material/TableRow';
import Download from '@mui/icons-material/Download';
import type { CourseForecast, ForecastAbout, OutlookRunSummary } from '@kinpath/contracts';
import {
  DEFAULT_AT_RISK_BELOW,
  FORECAST_FLAG_LABELS,
  FORECAST_FLAGS,
  OUTLOOK_CAUTIONS,
} from '@kinpath/contracts';
import { EmptyState } from '../../../components/EmptyState';
import { EstimateCautions } from '../../../components/EstimateCautions';
import { PageHeader } from '../../../components/PageHeader';
import { apiMessage } from '../../../lib/api-client';
import { useAuth } from '../../auth/AuthProvider';
import { TermDataStatus } from '../../terms/components/TermDataStatus';
import {
  downloadOutlookCsv,
  useBacktest,
  useForecasts,
  useOutlookAbout,
  useOutlookRuns,
} from '../api/outlook';
import { BacktestSection } from '../components/BacktestSection';
import { FLAG_EXPLANATIONS, FlagLabel } from '../components/FlagLabel';
import { OutlookChart } from '../components/OutlookChart';
import { OutlookTable } from '../components/OutlookTable';
import { fixed, percent } from '../format';

function runProgress(run: OutlookRunSummary): string {
  return `${run.stepsDone} of ${run.stepsTotal || '…'} terms computed`;
}

/** Seats, expected enrolment and utilisation summed per department. */
export function departmentTotals(rows: readonly CourseForecast[]) {
  const totals = new Map<string, { electives: number; seats: number; expected: number }>();
  for (const r of rows) {
    const t = totals.get(r.department) ?? { electives: 0, seats: 0, expected: 0 };
    t.electives++;
    t.seats += r.capacity;
    t.expected += r.expected;
    totals.set(r.department, t);
  }
  return [...totals].map(([department, t]) => ({
    department,
    ...t,
    utilisation: t.seats > 0 ? t.expected / t.seats : null,
  }));
}

function DepartmentTotals({ rows }: { rows: readonly CourseForecast[] }) {
  const totals = departmentTotals(rows);
  if (totals.length === 0) return null;
  return (
    <TableContainer component={Paper} variant="outlined" sx={{ maxWidth: 720 }}>
      <Table size="small">
        <caption style={{ captionSide: 'top', textAlign: 'left' }}>Department totals</caption>
        <TableHead>
          <TableRow>
            <TableCell scope="col">Department</TableCell>
            <TableCell scope="col" align="right">
              Electives
            </TableCell>
            <TableCell scope="col" align="right">
              Seats
            </TableCell>
            <TableCell scope="col" align="right">
              Expected
            </TableCell>
            <TableCell scope="col" align="right">
              Utilisation (% of seats)
            </TableCell>
          </TableRow>
        </TableHead>
        <TableBody>
          {totals.map((t) => (
            <TableRow key={t.department}>
              <TableCell component="th" scope="row">
                {t.department}
              </TableCell>
              <TableCell align="right">{t.electives}</TableCell>
              <TableCell align="right">{t.seats}</TableCell>
              <TableCell align="right">{fixed(t.expected)}</TableCell>
              <TableCell align="right">{percent(t.utilisation, 1)}</TableCell>
            </TableRow>
          ))}
        </TableBody>
      </Table>
    </TableContainer>
  );
}

/** What to say when there is nothing to show yet; null when the outlook can be shown. */
export function OutlookEmpty({ about }: { about: ForecastAbout }) {
  if (!about.term) {
    return (
      <EmptyState heading="No outlook yet">
        <Typography sx={{ mb: 1.5 }}>
          The outlook needs the catalogue, next term&apos;s offerings and past term data, imported
          by the registrar&apos;s office.
        </Typography>
        <TermDataStatus whenEmpty="No term data has been imported yet, so there is nothing to forecast from. The registrar's office imports it." />
      </EmptyState>
    );
  }
  if (about.offerings === 0) {
    return (
      <EmptyState heading={`No offerings imported for ${about.term}`}>
        <Typography sx={{ mb: 1.5 }}>
          The outlook compares expected demand with the seats of each elective offered in{' '}
          {about.term}. The registrar&apos;s office must first import the offerings file for{' '}
          {about.term} (term, course code, sections and capacity for each elective), with the
          catalogue and past term data already in place.
        </Typography>
        <Typography>Once it is imported, the outlook is computed within minutes.</Typography>
      </EmptyState>
    );
  }
  return (
    <EmptyState heading={`The outlook for ${about.term} is being computed`}>
      <Typography sx={{ mb: 1.5 }}>
        The choices of every active student among the electives offered in {about.term} are being
        estimated, with backtests of the last completed terms; the table appears here when that is
        done.
      </Typography>
      {about.pending ? (
        <>
          <LinearProgress
            variant="determinate"
            value={Math.round(about.pending.progress * 100)}
            aria-label="Outlook progress"
          />
          <Typography variant="body2" sx={{ mt: 1 }}>
            {runProgress(about.pending)}.
          </Typography>
        </>
      ) : null}
    </EmptyState>
  );
}

function RunStatus({ runs }: { runs: OutlookRunSummary[] }) {
  const latest = runs[0];
  if (!latest) return null;
  const words: Record<OutlookRunSummary['status'], string> = {
    queued: 'queued',
    computing: 'computing',
    done: 'done',
    failed: 'failed',
    superseded: 'replaced by a newer run',
  };
  return (
    <Typography variant="body2" sx={{ color: 'text.secondary' }}>
      Latest outlook run for {latest.term} ({latest.reason}): {words[latest.status]},{' '}
      {runProgress(latest)}
      {latest.students !== null ? `, ${latest.students} active students` : ''}
      {latest.error ? ` — ${latest.error}` : ''}.
    </Typography>
  );
}

export function OutlookPage() {
  const { user } = useAuth();
  const isHead = user?.role === 'department_head';
  const ownDepartment = isHead ? (user?.department ?? undefined) : undefined;
  const about = useOutlookAbout();
  const ready = !!about.data?.run;
  const runId = about.data?.run?.id ?? null;
  const [thresholdText, setThresholdText] = useState(String(DEFAULT_AT_RISK_BELOW));
  const threshold = Number(thresholdText);
  const thresholdValid =
    thresholdText.trim() !== '' && Number.isFinite(threshold) && threshold >= 0;
  const atRiskBelow = thresholdValid ? threshold : DEFAULT_AT_RISK_BELOW;
  const [department, setDepartment] = useState('');
  const [tab, setTab] = useState<'outlook' | 'backtest'>('outlook');
  const [exportError, setExportError] = useState<string | null>(null);
  const forecasts = useForecasts({ department: ownDepartment, atRiskBelow }, ready, runId);
  const [backtestTerm, setBacktestTerm] = useState<string | undefined>(undefined);
  const backtest = useBacktest(ownDepartment, backtestTerm, ready && tab === 'backtest', runId);
  const runs = useOutlookRuns(!isHead);
  const ids = { threshold: useId(), chart: useId(), outlookTab: useId(), backtestTab: useId() };

  const allRows = useMemo(() => forecasts.data ?? [], [forecasts.data]);
  const departments = useMemo(
    () => [...new Set(allRows.map((r) => r.department))].sort(),
    [allRows],
  );
  const rows = department ? allRows.filter((r) => r.department === department) : allRows;
  const backtestData = backtest.data
    ? department && !isHead
      ? {
          ...backtest.data,
          courses: backtest.data.courses.filter((c) => c.department === department),
        }
      : backtest.data
    : null;
  const scope = ownDepartment ?? (department || undefined);
  const term = about.data?.term ?? null;

  const exportCsv = async () => {
    setExportError(null);
    try {
      await downloadOutlookCsv({ department: scope, atRiskBelow }, term);
    } catch (error) {
      setExportError(apiMessage(error) ?? 'The CSV could not be exported; try again.');
    }
  };

  return (
    <>
      <PageHeader
        title="Demand outlook"
        lead={
          ownDepartment
            ? `Expected demand for the electives of department ${ownDepartment}${term ? ` in ${term}` : ' next term'}, against the seats offered.`
            : `Expected demand for each department’s electives${term ? ` in ${term}` : ' next term'}, against the seats offered.`
        }
        actions={
          ready ? (
            <Button variant="outlined" startIcon={<Download />} onClick={() => void exportCsv()}>
              Export CSV
            </Button>
          ) : undefined
        }
      />
      <Stack spacing={3}>
        {exportError ? <Alert severity="error">{exportError}</Alert> : null}
        {about.isError ? (
          <Alert severity="error">
            {apiMessage(about.error) ?? 'The outlook could not be loaded; try again.'}
          </Alert>
        ) : null}
        {about.isPending ? <LinearProgress aria-label="Loading the outlook" /> : null}
        {about.data && !ready ? <OutlookEmpty about={about.data} /> : null}
        {about.data && ready ? (
          <>
            {about.data.pending ? (
              <Alert severity="info">
                A newer outlook is being computed after a change to the term data (
                {runProgress(about.data.pending)}); the figures below stay until it is done.
              </Alert>
            ) : null}
            <Box sx={{ display: 'flex', gap: 2, flexWrap: 'wrap', alignItems: 'flex-start' }}>
              <TextField
                id={ids.threshold}
                label="At risk below (students)"
                type="number"
                size="small"
                value={thresholdText}
                onChange={(e) => setThresholdText(e.target.value)}
                error={!thresholdValid}
                helperText={
                  thresholdValid
                    ? 'Electives expected to draw fewer students are flagged at risk.'
                    : 'Enter a number of students, 0 or more.'
                }
                slotProps={{ htmlInput: { min: 0, step: 1 } }}
                sx={{ width: 260 }}
              />
              {!isHead ? (
                <TextField
                  select
                  label="Department"
                  size="small"
                  value={department}
                  onChange={(e) => setDepartment(e.target.value)}
                  // The empty value is "All departments": shown, not a blank box.
                  slotProps={{ select: { displayEmpty: true }, inputLabel: { shrink: true } }}
                  sx={{ minWidth: 200 }}
                >
                  <MenuItem value="">All departments</MenuItem>
                  {departments.map((d) => (
                    <MenuItem key={d} value={d}>
                      {d}
                    </MenuItem>
                  ))}
                </TextField>
              ) : null}
            </Box>
            {about.data.drivers ? (
              <Typography variant="body2" sx={{ maxWidth: '78ch' }}>
                <strong>What drives demand:</strong> {about.data.drivers}
              </Typography>
            ) : null}
            <Tabs
              value={tab}
              onChange={(_e, value: 'outlook' | 'backtest') => setTab(value)}
              aria-label="Outlook and backtest"
            >
              <Tab
                value="outlook"
                label={`Outlook for ${term ?? ''}`}
                id={ids.outlookTab}
                aria-controls={`${ids.outlookTab}-panel`}
              />
              <Tab
                value="backtest"
                label="Backtest"
                id={ids.backtestTab}
                aria-controls={`${ids.backtestTab}-panel`}
              />
            </Tabs>
            <Box
              role="tabpanel"
              id={`${ids.outlookTab}-panel`}
              aria-labelledby={ids.outlookTab}
              hidden={tab !== 'outlook'}
            >
              {tab === 'outlook' ? (
                <Stack spacing={2}>
                  <Box
                    component="ul"
                    sx={{ m: 0, pl: 0, listStyle: 'none', display: 'grid', gap: 0.5 }}
                  >
                    {FORECAST_FLAGS.map((f) => (
                      <li key={f}>
                        <FlagLabel flag={f} />
                        <Typography component="span" variant="body2" sx={{ ml: 1 }}>
                          {FLAG_EXPLANATIONS[f]}
                        </Typography>
                      </li>
                    ))}
                  </Box>
                  {forecasts.isError ? (
                    <Alert severity="error">
                      {apiMessage(forecasts.error) ?? 'The outlook could not be loaded.'}
                    </Alert>
                  ) : null}
                  {forecasts.isPending ? <LinearProgress aria-label="Loading the outlook" /> : null}
                  {forecasts.data && rows.length === 0 ? (
                    <EmptyState heading={`No electives offered${scope ? ` by ${scope}` : ''}`}>
                      <Typography>
                        {scope ? `Department ${scope} offers` : 'No department offers'} no electives
                        in {term ?? 'the next term'}, so there is no demand to forecast. Offerings
                        come from the registrar&apos;s offerings import.
                      </Typography>
                    </EmptyState>
                  ) : null}
                  {forecasts.data && rows.length > 0 ? (
                    <>
                      <DepartmentTotals rows={rows} />
                      <OutlookTable
                        rows={rows}
                        caption={`${rows.length} electives offered in ${term ?? ''}${scope ? `, department ${scope}` : ''}: ${FORECAST_FLAGS.map((f) => `${rows.filter((r) => r.flag === f).length} ${FORECAST_FLAG_LABELS[f].toLowerCase()}`).join(', ')}`}
                      />
                      <OutlookChart rows={rows} id={ids.chart} />
                    </>
                  ) : null}
                </Stack>
              ) : null}
            </Box>
            <Box
              role="tabpanel"
              id={`${ids.backtestTab}-panel`}
              aria-labelledby={ids.backtestTab}
              hidden={tab !== 'backtest'}
            >
              {tab === 'backtest' ? (
                <>
                  {backtest.isPending ? <LinearProgress aria-label="Loading the backtest" /> : null}
                  {backtest.isError ? (
                    <Alert severity="error">
                      {apiMessage(backtest.error) ?? 'The backtest could not be loaded.'}
                    </Alert>
                  ) : null}
                  {backtestData && backtestData.term ? (
                    <BacktestSection backtest={backtestData} onTerm={setBacktestTerm} />
                  ) : backtestData ? (
                    <Typography>
                      There is no completed term before {term} to backtest against yet.
                    </Typography>
                  ) : null}
                </>
              ) : null}
            </Box>
            {!isHead && runs.data ? <RunStatus runs={runs.data} /> : null}
          </>
        ) : null}
        <EstimateCautions cautions={OUTLOOK_CAUTIONS} />
      </Stack>
    </>
  );
}
