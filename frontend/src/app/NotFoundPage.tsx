import { Link as RouterLink, useLocation } from 'react-router';
import Button from '@mui/material/Button';
import Typography from '@mui/material/Typography';
import { PageHeader } from '../components/PageHeader';
import { useAuth } from '../features/auth/AuthProvider';
import { landingPathFor } from './pages';

export function NotFoundPage() {
  const { user } = useAuth();
  const { pathname } = useLocation();
  return (
    <>
      <PageHeader title="Page not found" />
      <Typography sx={{ maxWidth: '70ch', mb: 3 }}>
        There is no page at <code>{pathname}</code>. The link may be mistyped or out of date.
      </Typography>
      <Button
        component={RouterLink}
        to={user ? landingPathFor(user.role) : '/sign-in'}
        variant="contained"
      >
        {user ? 'Go to your home page' : 'Go to sign-in'}
      </Button>
    </>
  );
}
