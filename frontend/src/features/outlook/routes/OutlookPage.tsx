import Stack from '@mui/material/Stack';
import Typography from '@mui/material/Typography';
import { EmptyState } from '../../../components/EmptyState';
import { PageHeader } from '../../../components/PageHeader';
import { useAuth } from '../../auth/AuthProvider';
import { TermDataStatus } from '../../terms/components/TermDataStatus';

export function OutlookPage() {
  const { user } = useAuth();
  const department = user?.role === 'department_head' ? user.department : null;
  return (
    <>
      <PageHeader
        title="Demand outlook"
        lead={
          department
            ? `Expected demand for the electives of department ${department} next term, against the seats offered.`
            : 'Expected demand for each department’s electives next term, against the seats offered.'
        }
      />
      <Stack spacing={3}>
        <EmptyState heading="No outlook yet">
          <Typography sx={{ mb: 1.5 }}>
            For each elective, the outlook will show the expected enrolment with an interval next to
            the seats offered, flag electives likely to be over- or under-subscribed, compare the
            forecast with what really happened in a past term (the backtest), and export the table
            as CSV for planning.
          </Typography>
          <Typography sx={{ mb: 1.5 }}>
            It needs the catalogue, next term&apos;s offerings and past term data, imported by the
            registrar&apos;s office.
          </Typography>
          <TermDataStatus whenEmpty="No term data has been imported yet, so there is nothing to forecast from. The registrar's office imports it." />
        </EmptyState>
      </Stack>
    </>
  );
}
