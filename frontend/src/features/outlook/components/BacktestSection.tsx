import { useId } from 'react';
import { LineChart } from '@mui/x-charts/LineChart';
import Box from '@mui/material/Box';
import Button from '@mui/material/Button';
import MenuItem from '@mui/material/MenuItem';
import Paper from '@mui/material/Paper';
import Table from '@mui/material/Table';
import TableBody from '@mui/material/TableBody';
import TableCell from '@mui/material/TableCell';
import TableContainer from '@mui/material/TableContainer';
import TableHead from '@mui/material/TableHead';
import TableRow from '@mui/material/TableRow';
import TextField from '@mui/material/TextField';
import Typography from '@mui/material/Typography';
import Download from '@mui/icons-material/Download';
import type { BacktestResponse } from '@kinpath/contracts';
import { fixed, percent } from '../format';

// Figures in tables are tabular already (the theme); these keep each figure on one line.
const num = { whiteSpace: 'nowrap' } as const;

const FORECASTS = [
  { key: 'modelWape', label: 'Model', color: '#1F5C58' },
  { key: 'naiveWape', label: 'Naive (last time it ran)', color: '#B5673F' },
  { key: 'sameTermWape', label: 'Same term a year before', color: '#6B5B95' },
  { key: 'takeUpWape', label: 'Take-up rate × open students', color: '#3B3A36' },
] as const;

/** The per-elective rows of the chosen term as CSV, percentages as numbers with their unit. */
export function backtestCsv(b: BacktestResponse): string {
  const cell = (v: string) =>
    /^[=+\-@\t\r]/.test(v) ? `'${v}` : /[",\r\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v;
  const header = [
    'term',
    'course_code',
    'title',
    'department',
    'enrolled',
    'model',
    'interval_low_80',
    'interval_high_80',
    'inside_interval',
    'naive',
    'naive_term',
    'same_term_year_before',
    'take_up',
    'no_history',
  ];
  const rows = b.courses.map((c) => [
    b.term ?? '',
    c.courseCode,
    c.title,
    c.department,
    String(c.actual),
    c.forecast.toFixed(1),
    c.low.toFixed(1),
    c.high.toFixed(1),
    c.inside ? 'yes' : 'no',
    c.naive.toFixed(0),
    c.naiveTerm ?? '',
    c.sameTerm.toFixed(0),
    c.takeUp.toFixed(1),
    c.noHistory ? 'yes' : 'no',
  ]);
  return [header, ...rows].map((r) => r.map(cell).join(',')).join('\r\n') + '\r\n';
}

function saveCsv(b: BacktestResponse) {
  const url = URL.createObjectURL(new Blob([backtestCsv(b)], { type: 'text/csv' }));
  const link = document.createElement('a');
  link.href = url;
  link.download = `demand-outlook-backtest-${b.term ?? 'term'}.csv`;
  document.body.appendChild(link);
  link.click();
  link.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}

/**
 * The backtests: each of the last three completed terms forecast from the records before it,
 * against what happened, next to three simple forecasts; then one term per elective.
 */
export function BacktestSection({
  backtest,
  onTerm,
}: {
  backtest: BacktestResponse;
  onTerm: (term: string) => void;
}) {
  const figureId = useId();
  const termId = useId();
  const rows = backtest.courses;
  const terms = backtest.terms;
  return (
    <Box sx={{ display: 'grid', gap: 2 }}>
      {backtest.verdict ? (
        <Typography sx={{ fontWeight: 600, maxWidth: '78ch' }}>{backtest.verdict}</Typography>
      ) : null}
      <Typography sx={{ maxWidth: '78ch' }}>
        Each of the last completed terms forecast from the records before it, against the students
        who really enrolled. WAPE is the sum of the forecasts&apos; misses over the sum of
        enrolments (lower is better); coverage is the share of electives whose enrolment fell inside
        the 80 % interval (about 80 % is right).
      </Typography>
      <TableContainer component={Paper} variant="outlined">
        <Table size="small">
          <caption style={{ captionSide: 'top', textAlign: 'left' }}>
            WAPE per backtest term, all departments
          </caption>
          <TableHead>
            <TableRow>
              <TableCell scope="col">Term</TableCell>
              {FORECASTS.map((f) => (
                <TableCell key={f.key} scope="col" align="right">
                  {f.label}
                </TableCell>
              ))}
              <TableCell scope="col" align="right">
                Coverage of the 80 % interval
              </TableCell>
            </TableRow>
          </TableHead>
          <TableBody>
            {terms.map((t) => (
              <TableRow key={t.term}>
                <TableCell component="th" scope="row">
                  {t.term}
                </TableCell>
                {FORECASTS.map((f) => (
                  <TableCell key={f.key} align="right" sx={num}>
                    {percent(t[f.key], 1)}
                  </TableCell>
                ))}
                <TableCell align="right" sx={num}>
                  {percent(t.coverage, 0)}
                </TableCell>
              </TableRow>
            ))}
          </TableBody>
        </Table>
      </TableContainer>
      {terms.length > 0 ? (
        <Box component="figure" aria-labelledby={figureId} sx={{ m: 0 }}>
          <Typography
            id={figureId}
            component="figcaption"
            variant="body2"
            sx={{ color: 'text.secondary' }}
          >
            WAPE per backtest term of the model and the three simple forecasts (the table above
            lists the same figures).
          </Typography>
          <Box aria-hidden>
            <LineChart
              height={240}
              skipAnimation
              margin={{ left: 8, right: 16, top: 8, bottom: 8 }}
              xAxis={[{ scaleType: 'point', data: terms.map((t) => t.term) }]}
              yAxis={[{ label: 'WAPE (%)', width: 56 }]}
              series={FORECASTS.map((f) => ({
                data: terms.map((t) => (t[f.key] === null ? null : 100 * (t[f.key] as number))),
                label: f.label,
                color: f.color,
                valueFormatter: (v: number | null) => (v === null ? '–' : `${v.toFixed(1)} %`),
              }))}
            />
          </Box>
        </Box>
      ) : null}
      <Box sx={{ display: 'flex', gap: 2, alignItems: 'center', flexWrap: 'wrap' }}>
        <TextField
          id={termId}
          select
          size="small"
          label="Term per elective"
          value={backtest.term ?? ''}
          onChange={(e) => onTerm(e.target.value)}
          sx={{ minWidth: 180 }}
        >
          {terms.map((t) => (
            <MenuItem key={t.term} value={t.term}>
              {t.term}
            </MenuItem>
          ))}
        </TextField>
        <Button variant="outlined" startIcon={<Download />} onClick={() => saveCsv(backtest)}>
          Export backtest CSV
        </Button>
        <Typography variant="body2" className="kp-figures" sx={num}>
          Over these electives: model WAPE {percent(backtest.modelWape, 1)}, naive{' '}
          {percent(backtest.naiveWape, 1)}, coverage {percent(backtest.coverage, 0)}.
        </Typography>
      </Box>
      <TableContainer component={Paper} variant="outlined">
        <Table size="small">
          <caption style={{ captionSide: 'top', textAlign: 'left' }}>
            Backtest of {backtest.term}, per elective
          </caption>
          <TableHead>
            <TableRow>
              <TableCell scope="col">Course</TableCell>
              <TableCell scope="col">Title</TableCell>
              <TableCell scope="col" align="right">
                Enrolled
              </TableCell>
              <TableCell scope="col" align="right">
                Model
              </TableCell>
              <TableCell scope="col" align="right">
                80 % interval
              </TableCell>
              <TableCell scope="col" align="right">
                Naive
              </TableCell>
              <TableCell scope="col" align="right">
                Same term a year before
              </TableCell>
              <TableCell scope="col" align="right">
                Take-up
              </TableCell>
            </TableRow>
          </TableHead>
          <TableBody>
            {rows.map((r) => (
              <TableRow key={r.courseCode}>
                <TableCell>{r.courseCode}</TableCell>
                <TableCell>
                  {r.title}
                  {r.noHistory ? ' (no history)' : ''}
                </TableCell>
                <TableCell align="right" sx={num}>
                  {r.actual}
                </TableCell>
                <TableCell align="right" sx={num}>
                  {fixed(r.forecast)}
                </TableCell>
                <TableCell align="right" sx={num}>
                  {fixed(r.low)} – {fixed(r.high)}
                  {r.inside ? '' : ' (missed)'}
                </TableCell>
                <TableCell align="right" sx={num}>
                  {r.naive}
                  {r.naiveTerm ? ` (${r.naiveTerm})` : ' (never ran)'}
                </TableCell>
                <TableCell align="right" sx={num}>
                  {fixed(r.sameTerm, 0)}
                </TableCell>
                <TableCell align="right" sx={num}>
                  {fixed(r.takeUp)}
                </TableCell>
              </TableRow>
            ))}
          </TableBody>
        </Table>
      </TableContainer>
    </Box>
  );
}
