import { useId } from 'react';
import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Paper from '@mui/material/Paper';
import Stack from '@mui/material/Stack';
import Typography from '@mui/material/Typography';
import { PageHeader } from '../../../components/PageHeader';
import { useUsers } from '../api/users';
import { CreateUserForm } from '../components/CreateUserForm';
import { DepartmentsSection } from '../components/DepartmentsSection';
import { UsersTable } from '../components/UsersTable';

function AccountsSection() {
  const headingId = useId();
  const users = useUsers();
  return (
    <Box component="section" aria-labelledby={headingId} sx={{ minWidth: 0 }}>
      <Typography id={headingId} variant="h2" sx={{ mb: 1.5 }}>
        Accounts
      </Typography>
      {users.isPending ? (
        <Typography role="status" sx={{ color: 'text.secondary' }}>
          Loading accounts…
        </Typography>
      ) : users.isError ? (
        <Alert severity="error" role="alert">
          The accounts could not be loaded. Reload the page to try again.
        </Alert>
      ) : (
        <UsersTable users={users.data} captionId={headingId} />
      )}
    </Box>
  );
}

function CreateAccountSection() {
  const headingId = useId();
  return (
    <Paper
      component="section"
      aria-labelledby={headingId}
      variant="outlined"
      sx={{ p: 2.5, alignSelf: 'start', maxWidth: { xs: 560, xl: 'none' } }}
    >
      <Typography id={headingId} variant="h2" sx={{ mb: 0.5 }}>
        Add an account
      </Typography>
      <Typography sx={{ mb: 2, color: 'text.secondary' }}>
        One role per person. A department head sees only their own department.
      </Typography>
      <CreateUserForm />
    </Paper>
  );
}

export function UsersPage() {
  return (
    <>
      <PageHeader title="Users" lead="Who can sign in to Kinpath, and in which role." />
      <Box
        sx={{
          display: 'grid',
          gap: 3,
          gridTemplateColumns: { xs: '1fr', xl: 'minmax(0, 1fr) 380px' },
        }}
      >
        <AccountsSection />
        <Stack spacing={3} sx={{ alignSelf: 'start', minWidth: 0 }}>
          <CreateAccountSection />
          <DepartmentsSection />
        </Stack>
      </Box>
    </>
  );
}
