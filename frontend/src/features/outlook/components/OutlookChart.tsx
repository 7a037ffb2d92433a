import { BarChart } from '@mui/x-charts/BarChart';
import Box from '@mui/material/Box';
import Typography from '@mui/material/Typography';
import type { CourseForecast } from '@kinpath/contracts';

const SEATS = '#8C8577';
const INTERVAL = '#7FB5AE';
const EXPECTED = '#1F5C58';

/**
 * Expected demand with its 80 % interval against the seats, one row per elective. The interval
 * is a floating bar (an invisible bar up to its low end, stacked under the interval's width).
 * The table holds the same figures for screen readers and keyboard users.
 */
export function OutlookChart({ rows, id }: { rows: CourseForecast[]; id: string }) {
  if (rows.length === 0) return null;
  const codes = rows.map((r) => r.courseCode);
  return (
    <Box component="figure" aria-labelledby={id} sx={{ m: 0 }}>
      <Typography id={id} component="figcaption" variant="body2" sx={{ color: 'text.secondary' }}>
        Expected demand (dark bar), its 80 % interval (light bar) and the seats offered (grey bar)
        per elective. The table lists the same figures.
      </Typography>
      <Box aria-hidden>
        <BarChart
          layout="horizontal"
          height={Math.max(180, 56 + rows.length * 34)}
          skipAnimation
          margin={{ left: 8, right: 16, top: 8, bottom: 8 }}
          yAxis={[{ scaleType: 'band', data: codes, width: 88 }]}
          xAxis={[{ label: 'Students' }]}
          series={[
            { data: rows.map((r) => r.capacity), label: 'Seats', color: SEATS, stack: 'seats' },
            {
              data: rows.map((r) => r.low),
              stack: 'interval',
              color: 'transparent',
              valueFormatter: () => null,
            },
            {
              data: rows.map((r) => r.high - r.low),
              label: '80 % interval',
              stack: 'interval',
              color: INTERVAL,
              valueFormatter: (_v, { dataIndex }) =>
                `${rows[dataIndex].low.toFixed(1)} – ${rows[dataIndex].high.toFixed(1)}`,
            },
            {
              data: rows.map((r) => r.expected),
              label: 'Expected',
              color: EXPECTED,
              stack: 'expected',
              valueFormatter: (v) => (v === null ? null : v.toFixed(1)),
            },
          ]}
        />
      </Box>
    </Box>
  );
}
