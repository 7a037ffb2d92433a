import { useId } from 'react';
import Alert from '@mui/material/Alert';
import Box from '@mui/material/Box';
import Paper from '@mui/material/Paper';
import Typography from '@mui/material/Typography';
import { PageHeader } from '../../../components/PageHeader';
import { useAuth } from '../../auth/AuthProvider';
import { useApiTokens } from '../api/api-tokens';
import { CreateTokenForm } from '../components/CreateTokenForm';
import { TokensTable } from '../components/TokensTable';

function TokensSection({ isAdmin }: { isAdmin: boolean }) {
  const headingId = useId();
  const tokens = useApiTokens();
  return (
    <Box component="section" aria-labelledby={headingId} sx={{ minWidth: 0 }}>
      <Typography id={headingId} variant="h2" sx={{ mb: 1.5 }}>
        {isAdmin ? 'All script tokens' : 'Your script tokens'}
      </Typography>
      {tokens.isPending ? (
        <Typography role="status" sx={{ color: 'text.secondary' }}>
          Loading script tokens…
        </Typography>
      ) : tokens.isError ? (
        <Alert severity="error" role="alert">
          The script tokens could not be loaded. Reload the page to try again.
        </Alert>
      ) : (
        <TokensTable tokens={tokens.data} labelledBy={headingId} />
      )}
    </Box>
  );
}

export function ScriptTokensPage() {
  const { user } = useAuth();
  const headingId = useId();
  const isAdmin = user?.role === 'admin';
  return (
    <>
      <PageHeader
        title="Script tokens"
        lead="Secrets that let a script, such as the nightly term data upload, use Kinpath without signing in as a person."
      />
      <Box
        sx={{
          display: 'grid',
          gap: 3,
          gridTemplateColumns: { xs: '1fr', xl: 'minmax(0, 1fr) 420px' },
        }}
      >
        <TokensSection isAdmin={isAdmin} />
        <Paper
          component="section"
          aria-labelledby={headingId}
          variant="outlined"
          sx={{ p: 2.5, alignSelf: 'start', maxWidth: { xs: 560, xl: 'none' } }}
        >
          <Typography id={headingId} variant="h2" sx={{ mb: 0.5 }}>
            Create a script token
          </Typography>
          <Typography sx={{ mb: 2, color: 'text.secondary' }}>
            A token acts with its owner’s role, only for what its scopes allow, and never opens the
            web screens. Its actions appear in the audit trail under its name.
          </Typography>
          {user ? <CreateTokenForm isAdmin={isAdmin} selfId={user.id} /> : null}
        </Paper>
      </Box>
    </>
  );
}
