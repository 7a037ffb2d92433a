import Box from '@mui/material/Box';
import CheckCircleOutline from '@mui/icons-material/CheckCircleOutline';
import ErrorOutline from '@mui/icons-material/ErrorOutline';
import HourglassEmpty from '@mui/icons-material/HourglassEmpty';
import Replay from '@mui/icons-material/Replay';
import TaskAlt from '@mui/icons-material/TaskAlt';
import WarningAmber from '@mui/icons-material/WarningAmber';
import type { ImportSummary } from '@kinpath/contracts';
import { isRunning, statusLabel } from '../words';

type Tone = 'success' | 'warning' | 'error' | 'info' | 'text.secondary';

function toneOf(summary: Pick<ImportSummary, 'status' | 'partial'>): Tone {
  if (summary.status === 'committed') return summary.partial ? 'warning' : 'success';
  if (summary.status === 'failed') return 'error';
  if (summary.status === 'validated') return 'info';
  return 'text.secondary';
}

/** The status as words with an icon; the colour only repeats what the words say. */
export function StatusLabel({ summary }: { summary: Pick<ImportSummary, 'status' | 'partial'> }) {
  const tone = toneOf(summary);
  const color = tone === 'text.secondary' ? tone : `${tone}.main`;
  const Icon =
    summary.status === 'committed'
      ? summary.partial
        ? WarningAmber
        : TaskAlt
      : summary.status === 'failed'
        ? ErrorOutline
        : summary.status === 'rolled_back'
          ? Replay
          : isRunning(summary.status)
            ? HourglassEmpty
            : CheckCircleOutline;
  return (
    <Box
      component="span"
      sx={{ display: 'inline-flex', alignItems: 'center', gap: 0.5, whiteSpace: 'nowrap' }}
    >
      <Icon aria-hidden sx={{ fontSize: 18, color }} />
      <Box component="span" sx={{ fontWeight: 700 }}>
        {statusLabel(summary)}
      </Box>
    </Box>
  );
}
