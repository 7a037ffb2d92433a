import { useId } from 'react';
import { BarChart } from '@mui/x-charts/BarChart';
import Box from '@mui/material/Box';
import Paper from '@mui/material/Paper';
import Table from '@mui/material/Table';
import TableBody from '@mui/material/TableBody';
import TableCell from '@mui/material/TableCell';
import TableContainer from '@mui/material/TableContainer';
import TableHead from '@mui/material/TableHead';
import TableRow from '@mui/material/TableRow';
import Typography from '@mui/material/Typography';
import type { BacktestResponse } from '@kinpath/contracts';
import { fixed, percent } from '../format';

const num = { fontVariantNumeric: 'tabular-nums', whiteSpace: 'nowrap' } as const;

/** Which forecast came closer overall, said plainly either way. */
export function backtestVerdict(b: BacktestResponse): string {
  if (b.modelWape === null || b.naiveWape === null) {
    return 'Nobody enrolled in these electives that term, so there is nothing to compare.';
  }
  const model = percent(b.modelWape, 1);
  const naive = percent(b.naiveWape, 1);
  if (b.modelWape < b.naiveWape) {
    return `The model's forecast was closer than the naive one: WAPE ${model} against ${naive}.`;
  }
  if (b.modelWape > b.naiveWape) {
    return `The naive forecast (each elective's enrolment the last time it ran) was closer than the model's: WAPE ${naive} against ${model}. Weigh the outlook accordingly.`;
  }
  return `The model and the naive forecast were equally close: WAPE ${model}.`;
}

/** The backtest: the forecast of a finished term from the data before it, against what happened. */
export function BacktestSection({ backtest }: { backtest: BacktestResponse }) {
  const figureId = useId();
  const rows = backtest.courses;
  return (
    <Box sx={{ display: 'grid', gap: 2 }}>
      <Typography>
        Forecast for {backtest.term} made from the records before it, against the students who
        really enrolled, next to the naive forecast. {backtestVerdict(backtest)}
      </Typography>
      <Box component="dl" sx={{ display: 'flex', gap: 4, m: 0, '& dd': { m: 0, ...num } }}>
        <div>
          <Typography component="dt" variant="body2" sx={{ color: 'text.secondary' }}>
            WAPE of the model
          </Typography>
          <Typography component="dd" variant="h3">
            {percent(backtest.modelWape, 1)}
          </Typography>
        </div>
        <div>
          <Typography component="dt" variant="body2" sx={{ color: 'text.secondary' }}>
            WAPE of the naive forecast
          </Typography>
          <Typography component="dd" variant="h3">
            {percent(backtest.naiveWape, 1)}
          </Typography>
        </div>
      </Box>
      {backtest.betaMethod ? (
        <Typography variant="body2" sx={{ color: 'text.secondary', maxWidth: '78ch' }}>
          {backtest.betaMethod}
        </Typography>
      ) : null}
      <Box component="figure" aria-labelledby={figureId} sx={{ m: 0 }}>
        <Typography
          id={figureId}
          component="figcaption"
          variant="body2"
          sx={{ color: 'text.secondary' }}
        >
          Students enrolled, the model&apos;s forecast and the naive forecast per elective in{' '}
          {backtest.term}. The table below lists the same figures.
        </Typography>
        <Box aria-hidden>
          <BarChart
            height={300}
            skipAnimation
            margin={{ left: 8, right: 16, top: 8, bottom: 8 }}
            xAxis={[
              {
                scaleType: 'band',
                data: rows.map((r) => r.courseCode),
                tickLabelStyle: { angle: -45, textAnchor: 'end', fontSize: 11 },
                height: 64,
              },
            ]}
            yAxis={[{ label: 'Students', width: 48 }]}
            series={[
              { data: rows.map((r) => r.actual), label: 'Enrolled', color: '#3B3A36' },
              {
                data: rows.map((r) => r.forecast),
                label: 'Model',
                color: '#1F5C58',
                valueFormatter: (v) => (v === null ? null : v.toFixed(1)),
              },
              { data: rows.map((r) => r.naive), label: 'Naive', color: '#B5673F' },
            ]}
          />
        </Box>
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
                Model error
              </TableCell>
              <TableCell scope="col" align="right">
                Naive
              </TableCell>
              <TableCell scope="col" align="right">
                Naive error
              </TableCell>
            </TableRow>
          </TableHead>
          <TableBody>
            {rows.map((r) => (
              <TableRow key={r.courseCode}>
                <TableCell>{r.courseCode}</TableCell>
                <TableCell>{r.title}</TableCell>
                <TableCell align="right" sx={num}>
                  {r.actual}
                </TableCell>
                <TableCell align="right" sx={num}>
                  {fixed(r.forecast)}
                </TableCell>
                <TableCell align="right" sx={num}>
                  {fixed(r.low)} – {fixed(r.high)}
                </TableCell>
                <TableCell align="right" sx={num}>
                  {percent(r.modelError)}
                </TableCell>
                <TableCell align="right" sx={num}>
                  {r.naive}
                  {r.naiveTerm ? ` (${r.naiveTerm})` : ' (never ran)'}
                </TableCell>
                <TableCell align="right" sx={num}>
                  {percent(r.naiveError)}
                </TableCell>
              </TableRow>
            ))}
          </TableBody>
        </Table>
      </TableContainer>
    </Box>
  );
}
