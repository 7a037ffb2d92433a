import type { ReactNode } from 'react';
import Alert from '@mui/material/Alert';
import Typography from '@mui/material/Typography';
import { useTermData } from '../api/useTerms';

interface TermDataStatusProps {
  /** What to say when no term has been imported yet: who imports it and what that unlocks. */
  whenEmpty: ReactNode;
}

/** One line on what term data Kinpath holds, read from the API rather than assumed. */
export function TermDataStatus({ whenEmpty }: TermDataStatusProps) {
  const { data, isPending, isError } = useTermData();

  if (isPending) {
    return (
      <Typography role="status" sx={{ color: 'text.secondary' }}>
        Checking which terms Kinpath holds…
      </Typography>
    );
  }
  if (isError) {
    return (
      <Typography role="status" sx={{ color: 'text.secondary' }}>
        Kinpath could not check its term data just now, so this page cannot say what has been
        imported.
      </Typography>
    );
  }
  if (data.current === null) {
    return (
      <Alert severity="warning" role="status">
        {whenEmpty}
      </Alert>
    );
  }
  const count = data.termsWithRecords.length;
  const first = data.termsWithRecords[0] ?? data.current;
  return (
    <Typography role="status">
      Term data covers {count === 1 ? '1 term' : `${count} terms`}
      {count > 1 ? `, ${first} to ${data.current}` : `, ${data.current}`}.
      {data.next ? ` The next term is ${data.next}.` : ''}
    </Typography>
  );
}
