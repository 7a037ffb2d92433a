import { useId } from 'react';
import type { ReactNode } from 'react';
import Paper from '@mui/material/Paper';
import Typography from '@mui/material/Typography';

interface EmptyStateProps {
  /** What to do first, as a heading (`h2`). */
  heading: string;
  /** What will appear here once there is something to show. */
  children: ReactNode;
}

/** An honest empty page: what will be here, and what has to happen first. */
export function EmptyState({ heading, children }: EmptyStateProps) {
  const headingId = useId();
  return (
    <Paper
      component="section"
      aria-labelledby={headingId}
      variant="outlined"
      sx={{ p: { xs: 2, sm: 3 }, maxWidth: '78ch', borderStyle: 'dashed' }}
    >
      <Typography id={headingId} variant="h2" sx={{ mb: 1.5 }}>
        {heading}
      </Typography>
      {children}
    </Paper>
  );
}
