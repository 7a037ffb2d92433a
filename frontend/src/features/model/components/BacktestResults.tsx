import { useId, useState } from 'react';
import { BarChart } from '@mui/x-charts/BarChart';
import Accordion from '@mui/material/Accordion';
import AccordionDetails from '@mui/material/AccordionDetails';
import AccordionSummary from '@mui/material/AccordionSummary';
import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Button from '@mui/material/Button';
import Paper from '@mui/material/Paper';
import Table from '@mui/material/Table';
import TableBody from '@mui/material/TableBody';
import TableCell from '@mui/material/TableCell';
import TableContainer from '@mui/material/TableContainer';
import TableHead from '@mui/material/TableHead';
import TableRow from '@mui/material/TableRow';
import ToggleButton from '@mui/material/ToggleButton';
import ToggleButtonGroup from '@mui/material/ToggleButtonGroup';
import Typography from '@mui/material/Typography';
import ExpandMore from '@mui/icons-material/ExpandMore';
import type { EvaluationDetail, EvaluationSignal } from '@kinpath/contracts';
import { scrollRegionProps } from '../../../lib/scroll-region';
import { VisuallyHidden } from '../../advising/components/EstimateCells';
import { count, fixed, formatWhen, percent } from '../format';
import { isBest, summarise } from '../results';
import { describeSettings } from '../settings-words';
import { BestMark } from './BestMark';

const CONFIGURATION_COLOUR = '#1F5C58';
const BASELINE_COLOUR = '#6B6B6B';

/** A margin with its sign, e.g. +0.029. */
function signed(v: number): string {
  return `${v > 0 ? '+' : v < 0 ? '−' : ''}${Math.abs(v).toFixed(3)}`;
}

const SIGNAL_WORDS: Record<EvaluationSignal, string> = {
  grade: 'grade',
  satisfaction: 'satisfaction',
};

interface BacktestResultsProps {
  evaluation: EvaluationDetail;
  /** Offers "Use these settings" on each configuration. */
  onUse?: (configuration: number) => void;
}

/** A finished backtest: table and chart per signal, the best values marked, an honest note. */
export function BacktestResults({ evaluation, onUse }: BacktestResultsProps) {
  const [signal, setSignal] = useState<EvaluationSignal>('grade');
  const headingId = useId();
  const chartId = useId();
  const summary = summarise(evaluation.results, signal);
  const tested = summary.rows.length > 0 && summary.rows.some((r) => r.n > 0);
  const { dataState } = evaluation;
  const chartRows = summary.rows.filter((r) => r.mae !== null);

  return (
    <Box component="section" aria-labelledby={headingId}>
      <Typography id={headingId} variant="h2" sx={{ mb: 0.5 }}>
        Results for {evaluation.holdoutTerm}
      </Typography>
      <Typography variant="body2" sx={{ color: 'text.secondary', mb: 2 }}>
        Outcomes of {evaluation.holdoutTerm} predicted from the records before it, for students with
        at least 3 earlier records. Term data as of{' '}
        {dataState.latestImportAt ? formatWhen(dataState.latestImportAt) : 'the start'}
        {dataState.records !== null
          ? ` (${count(dataState.records)} records, ${count(dataState.students ?? 0)} students)`
          : ''}
        {evaluation.settingsVersion !== null
          ? `; settings version ${evaluation.settingsVersion} was in force.`
          : '.'}
      </Typography>

      <ToggleButtonGroup
        exclusive
        size="small"
        value={signal}
        onChange={(_e, value: EvaluationSignal | null) => value && setSignal(value)}
        aria-label="Outcome"
        sx={{
          mb: 2,
          // Full-contrast text; the chosen one is also bold, not only shaded.
          '& .MuiToggleButton-root': { color: 'text.primary', px: 2 },
          '& .MuiToggleButton-root.Mui-selected': { fontWeight: 700 },
        }}
      >
        <ToggleButton value="grade">Grade</ToggleButton>
        <ToggleButton value="satisfaction">Satisfaction</ToggleButton>
      </ToggleButtonGroup>

      {!tested ? (
        <Alert severity="info" sx={{ mb: 2 }}>
          No {SIGNAL_WORDS[signal]} outcome of {evaluation.holdoutTerm} could be tested: none was
          recorded for students with enough earlier records.
        </Alert>
      ) : summary.baselineWins && summary.bestBaseline && summary.bestConfiguration ? (
        <Alert severity="warning" sx={{ mb: 2 }} data-testid="baseline-wins">
          A baseline beats every configuration on {SIGNAL_WORDS[signal]}:{' '}
          {summary.bestBaseline.name} has an MAE of {fixed(summary.bestBaseline.mae)}, the best
          configuration ({summary.bestConfiguration.name}) {fixed(summary.bestConfiguration.mae)}.
          On this term, estimates from kin are less accurate than this simple rule; try other
          settings before advisors rely on these estimates.
        </Alert>
      ) : summary.bestBaseline && summary.bestConfiguration ? (
        <Alert severity="success" sx={{ mb: 2 }}>
          The best configuration, {summary.bestConfiguration.name}, has a {SIGNAL_WORDS[signal]} MAE
          of {fixed(summary.bestConfiguration.mae)}, lower than the best baseline (
          {summary.bestBaseline.name}, {fixed(summary.bestBaseline.mae)}).
        </Alert>
      ) : null}

      <TableContainer component={Paper} variant="outlined" sx={{ mb: 1 }}>
        {/* A fixed layout shares the box's width, so long names wrap instead of cutting it off. */}
        <Table
          size="small"
          sx={{
            tableLayout: 'fixed',
            width: '100%',
            '& td, & th': { px: 1, overflowWrap: 'anywhere' },
          }}
          aria-label={`Backtest results, ${SIGNAL_WORDS[signal]}`}
        >
          <TableHead>
            <TableRow>
              <TableCell sx={{ width: '28%' }}>Configuration or baseline</TableCell>
              <TableCell align="right">MAE</TableCell>
              <TableCell align="right">RMSE</TableCell>
              <TableCell align="right">Coverage</TableCell>
              <TableCell align="right">Margin over best baseline (95% interval)</TableCell>
              <TableCell align="right">Likely range held the outcome</TableCell>
              <TableCell align="right">Tested</TableCell>
              {onUse ? (
                <TableCell>
                  <VisuallyHidden>Action</VisuallyHidden>
                </TableCell>
              ) : null}
            </TableRow>
          </TableHead>
          <TableBody>
            {summary.rows.map((row) => {
              const settings =
                row.configuration !== null ? evaluation.configurations[row.configuration] : null;
              return (
                <TableRow key={`${row.kind}-${row.name}`} data-testid={`result-${row.name}`}>
                  <TableCell>
                    <Typography variant="body2" component="span" sx={{ fontWeight: 600 }}>
                      {row.name}
                    </Typography>
                    <Typography
                      variant="body2"
                      component="span"
                      sx={{ display: 'block', color: 'text.secondary' }}
                    >
                      {settings ? describeSettings(settings) : 'Baseline'}
                    </Typography>
                  </TableCell>
                  <TableCell align="right" className="kp-figures">
                    {fixed(row.mae)}
                    {isBest(row.mae, summary.bestMae) ? <BestMark label="lowest MAE" /> : null}
                  </TableCell>
                  <TableCell align="right" className="kp-figures">
                    {fixed(row.rmse)}
                    {isBest(row.rmse, summary.bestRmse) ? <BestMark label="lowest RMSE" /> : null}
                  </TableCell>
                  <TableCell align="right" className="kp-figures">
                    {percent(row.coverage)}
                  </TableCell>
                  <TableCell align="right" className="kp-figures">
                    {row.margin ? (
                      <>
                        {signed(row.margin.mae)}
                        <Box
                          component="span"
                          sx={{ display: 'block', color: 'text.secondary', fontSize: '0.85em' }}
                        >
                          {signed(row.margin.low)} to {signed(row.margin.high)}
                        </Box>
                      </>
                    ) : (
                      '—'
                    )}
                  </TableCell>
                  <TableCell align="right" className="kp-figures">
                    {row.ranges && row.ranges.coverage !== null ? (
                      <>
                        {percent(row.ranges.coverage)}
                        <Box
                          component="span"
                          sx={{ display: 'block', color: 'text.secondary', fontSize: '0.85em' }}
                        >
                          {(['high', 'medium', 'low'] as const)
                            .filter((c) => row.ranges && row.ranges.byConfidence[c].n > 0)
                            .map(
                              (c) =>
                                `${c} ${percent(row.ranges?.byConfidence[c].coverage ?? null)}`,
                            )
                            .join(', ')}
                        </Box>
                      </>
                    ) : (
                      '—'
                    )}
                  </TableCell>
                  <TableCell align="right" className="kp-figures">
                    {count(row.n)}
                  </TableCell>
                  {onUse ? (
                    <TableCell>
                      {row.configuration !== null ? (
                        <Button
                          size="small"
                          onClick={() => onUse(row.configuration as number)}
                          aria-label={`Use the settings of ${row.name}`}
                        >
                          Use these settings
                        </Button>
                      ) : null}
                    </TableCell>
                  ) : null}
                </TableRow>
              );
            })}
          </TableBody>
        </Table>
      </TableContainer>
      <Typography variant="body2" sx={{ color: 'text.secondary', mb: 3 }}>
        MAE and RMSE: the mean absolute and root-mean-square error of the estimates, in{' '}
        {signal === 'grade' ? 'grade points' : 'satisfaction points (1-5)'}; lower is better.
        Coverage: the share of outcomes estimated from kin (the rest from the baseline); for a
        baseline, the share it could estimate from its own data. Margin: how much lower the
        configuration&apos;s MAE is than the best baseline&apos;s (positive is better), with a 95%
        interval from resampling students; an interval that includes 0 shows no clear gain. Likely
        range: the share of outcomes inside their 80% likely range (made from the term before),
        overall and per confidence level; about 80% means the ranges are honest.
      </Typography>

      {chartRows.length > 0 ? (
        <Box component="figure" aria-labelledby={chartId} sx={{ m: 0, mb: 3 }}>
          <Typography id={chartId} component="figcaption" variant="h3" sx={{ mb: 1 }}>
            {signal === 'grade' ? 'Grade' : 'Satisfaction'} MAE per configuration (green) and
            baseline (grey); lower is better; the numbers are in the table above
          </Typography>
          <BarChart
            height={56 + chartRows.length * 34}
            layout="horizontal"
            hideLegend
            skipAnimation
            margin={{ top: 8, right: 24, bottom: 8, left: 8 }}
            yAxis={[
              {
                scaleType: 'band',
                data: chartRows.map((r) =>
                  r.kind === 'baseline' ? `${r.name} (baseline)` : r.name,
                ),
                width: 190,
                // Configurations and baselines in different colours (both 3:1 on the page).
                colorMap: {
                  type: 'ordinal',
                  values: chartRows.map((r) =>
                    r.kind === 'baseline' ? `${r.name} (baseline)` : r.name,
                  ),
                  colors: chartRows.map((r) =>
                    r.kind === 'baseline' ? BASELINE_COLOUR : CONFIGURATION_COLOUR,
                  ),
                },
              },
            ]}
            xAxis={[{ label: 'MAE', min: 0 }]}
            series={[
              {
                data: chartRows.map((r) => r.mae),
                label: 'MAE',
                color: CONFIGURATION_COLOUR,
                valueFormatter: (v) => fixed(v),
              },
            ]}
          />
        </Box>
      ) : null}

      <DepartmentResults evaluation={evaluation} signal={signal} />
    </Box>
  );
}

function DepartmentResults({
  evaluation,
  signal,
}: {
  evaluation: EvaluationDetail;
  signal: EvaluationSignal;
}) {
  const rows = evaluation.byDepartment.filter((r) => r.signal === signal);
  const departments = [...new Set(rows.map((r) => r.department))].sort();
  if (departments.length === 0) return null;
  const names = [...new Set(rows.map((r) => r.name))];
  return (
    <Accordion variant="outlined" disableGutters>
      <AccordionSummary expandIcon={<ExpandMore />}>
        <Typography component="span" sx={{ fontWeight: 600 }}>
          {signal === 'grade' ? 'Grade' : 'Satisfaction'} MAE by department
        </Typography>
      </AccordionSummary>
      <AccordionDetails>
        {/* Focusable and named: with many configurations it scrolls sideways. */}
        <TableContainer
          {...scrollRegionProps({ label: `MAE by department, ${SIGNAL_WORDS[signal]}` })}
        >
          <Table size="small" aria-label={`MAE by department, ${SIGNAL_WORDS[signal]}`}>
            <TableHead>
              <TableRow>
                <TableCell>Department</TableCell>
                <TableCell align="right">Tested</TableCell>
                {names.map((name) => (
                  <TableCell key={name} align="right">
                    {name}
                  </TableCell>
                ))}
              </TableRow>
            </TableHead>
            <TableBody>
              {departments.map((department) => {
                const own = rows.filter((r) => r.department === department);
                const best = summarise(own, signal).bestMae;
                return (
                  <TableRow key={department}>
                    <TableCell>{department}</TableCell>
                    <TableCell align="right" className="kp-figures">
                      {count(own[0]?.n ?? 0)}
                    </TableCell>
                    {names.map((name) => {
                      const r = own.find((x) => x.name === name);
                      return (
                        <TableCell key={name} align="right" className="kp-figures">
                          {fixed(r?.mae ?? null)}
                          {r && isBest(r.mae, best) ? <BestMark /> : null}
                        </TableCell>
                      );
                    })}
                  </TableRow>
                );
              })}
            </TableBody>
          </Table>
        </TableContainer>
      </AccordionDetails>
    </Accordion>
  );
}
