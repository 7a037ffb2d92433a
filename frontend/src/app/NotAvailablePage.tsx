import { Link as RouterLink } from 'react-router';
import Button from '@mui/material/Button';
import Typography from '@mui/material/Typography';
import { ROLE_LABELS } from '@kinpath/contracts';
import { PageHeader } from '../components/PageHeader';
import { useAuth } from '../features/auth/AuthProvider';
import { landingPathFor, type RolePage } from './pages';

function listOf(words: string[]): string {
  return words.length < 2 ? words.join('') : `${words.slice(0, -1).join(', ')} and ${words.at(-1)}`;
}

/** Shown for a deep link to a page that the signed-in role may not open. */
export function NotAvailablePage({ page }: { page: RolePage }) {
  const { user } = useAuth();
  if (!user) return null;
  return (
    <>
      <PageHeader title="Not available for your role" />
      <Typography sx={{ maxWidth: '70ch', mb: 1 }}>
        This page is for {listOf(page.roles.map((role) => ROLE_LABELS[role].toLowerCase()))}. You
        are signed in as {user.displayName}, {ROLE_LABELS[user.role].toLowerCase()}.
      </Typography>
      <Typography sx={{ maxWidth: '70ch', mb: 3, color: 'text.secondary' }}>
        If your work needs it, ask an administrator to change your role.
      </Typography>
      <Button component={RouterLink} to={landingPathFor(user.role)} variant="contained">
        Go to your home page
      </Button>
    </>
  );
}
