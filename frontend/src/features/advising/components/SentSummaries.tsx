import { useId } from 'react';
import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Paper from '@mui/material/Paper';
import Typography from '@mui/material/Typography';
import { useSentSummaries } from '../api/students';
import { dateTime } from '../format';

/** The summaries already e-mailed to this student: when, to which address, which courses. */
export function SentSummaries({ studentRef }: { studentRef: string }) {
  const headingId = useId();
  const sent = useSentSummaries(studentRef);
  return (
    <Paper
      component="section"
      aria-labelledby={headingId}
      variant="outlined"
      sx={{ p: 2.5 }}
      className="kp-no-print"
    >
      <Typography id={headingId} variant="h2" sx={{ mb: 1 }}>
        Sent summaries
      </Typography>
      {sent.isPending ? (
        <Typography role="status" sx={{ color: 'text.secondary' }}>
          Loading sent summaries…
        </Typography>
      ) : sent.isError ? (
        <Alert severity="error" role="alert">
          The sent summaries could not be loaded. Reload the page to try again.
        </Alert>
      ) : sent.data.length === 0 ? (
        <Typography sx={{ color: 'text.secondary' }}>No summary sent yet.</Typography>
      ) : (
        <Box component="ol" sx={{ listStyle: 'none', m: 0, p: 0 }}>
          {sent.data.map((s) => (
            <Box component="li" key={s.id} sx={{ borderTop: 1, borderColor: 'divider', py: 1 }}>
              <Typography
                className="kp-figures"
                sx={{ fontSize: '0.85rem', color: 'text.secondary' }}
              >
                <time dateTime={s.sentAt}>{dateTime(s.sentAt)}</time> · {s.senderName}
              </Typography>
              <Typography sx={{ overflowWrap: 'anywhere' }}>
                To {s.to}, for {s.term}: {s.courseCodes.join(', ')}
              </Typography>
            </Box>
          ))}
        </Box>
      )}
    </Paper>
  );
}
