import Stack from '@mui/material/Stack';
import Typography from '@mui/material/Typography';
import { EmptyState } from '../../../components/EmptyState';
import { EstimateCautions } from '../../../components/EstimateCautions';
import { PageHeader } from '../../../components/PageHeader';
import { TermDataStatus } from '../../terms/components/TermDataStatus';

export function AdvisingPage() {
  return (
    <>
      <PageHeader
        title="Advising"
        lead="Prepare a registration conversation: a student's course history and the electives open to them next term."
      />
      <Stack spacing={3}>
        <EmptyState heading="Look up a student">
          <Typography sx={{ mb: 1.5 }}>
            Here you will type a student number and see that student&apos;s course history and every
            elective they could take next term, each with a predicted grade, a predicted
            satisfaction and a fit score, how many kin (similar past students) the estimate rests
            on, and why. You will be able to shortlist electives, keep notes and e-mail the student
            a summary.
          </Typography>
          <Typography sx={{ mb: 1.5 }}>
            The student lookup is not open yet in this version of Kinpath. It needs the catalogue,
            offerings, students and term data imported by the registrar&apos;s office.
          </Typography>
          <TermDataStatus whenEmpty="No term data has been imported yet. Ask the registrar's office to import it; until then there are no students to look up." />
        </EmptyState>
        <EstimateCautions />
      </Stack>
    </>
  );
}
