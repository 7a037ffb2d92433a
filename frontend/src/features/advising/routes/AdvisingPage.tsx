import { useId } from 'react';
import Box from '@mui/material/Box';
import Paper from '@mui/material/Paper';
import Stack from '@mui/material/Stack';
import Typography from '@mui/material/Typography';
import { PageHeader } from '../../../components/PageHeader';
import { TermDataStatus } from '../../terms/components/TermDataStatus';
import { LookupForm } from '../components/LookupForm';
import { RecentLookups } from '../components/RecentLookups';

/** The advisor's landing page: look a student up, or go back to one looked up before. */
export function AdvisingPage() {
  const lookupHeading = useId();
  const recentHeading = useId();
  return (
    <>
      <PageHeader
        title="Advising"
        lead="Prepare a registration conversation: a student's course history and the electives open to them next term."
      />
      <Stack spacing={3} sx={{ maxWidth: '78ch' }}>
        <Paper
          component="section"
          aria-labelledby={lookupHeading}
          variant="outlined"
          sx={{ p: 2.5 }}
        >
          <Typography id={lookupHeading} variant="h2" sx={{ mb: 0.5 }}>
            Look up a student
          </Typography>
          <Typography sx={{ mb: 2, color: 'text.secondary' }}>
            Type the student number from the student information system. It is sent to Kinpath once
            and does not appear in addresses, on screen afterwards, or in the audit trail.
          </Typography>
          <LookupForm />
        </Paper>
        <Box component="section" aria-labelledby={recentHeading}>
          <Typography id={recentHeading} variant="h2" sx={{ mb: 1 }}>
            Your recent lookups
          </Typography>
          <RecentLookups />
        </Box>
        <TermDataStatus whenEmpty="No term data has been imported yet. Ask the registrar's office to import it; until then there are no students to look up." />
      </Stack>
    </>
  );
}
