import { Navigate, Link as RouterLink, useLocation, type Location } from 'react-router';
import Link from '@mui/material/Link';
import Box from '@mui/material/Box';
import Paper from '@mui/material/Paper';
import Typography from '@mui/material/Typography';
import type { Role } from '@kinpath/contracts';
import { Brand } from '../../../components/Brand';
import { PageTitle } from '../../../components/PageTitle';
import { MAIN_CONTENT_ID, SkipLink } from '../../../components/SkipLink';
import { PageLoading } from '../../../app/PageLoad';
import { landingPathFor, PAGES } from '../../../app/pages';
import { useAuth } from '../AuthProvider';
import { SignInForm } from '../components/SignInForm';

/** Back to the page that sent the user here, if the new session's role may open it. */
function destinationAfterSignIn(role: Role, from: Location | undefined): string {
  if (!from || from.pathname === '/' || from.pathname === '/sign-in') return landingPathFor(role);
  const page = Object.values(PAGES).find((p) => p.path === from.pathname);
  if (page && !(page.roles as readonly Role[]).includes(role)) return landingPathFor(role);
  return `${from.pathname}${from.search}`;
}

export function SignInPage() {
  const { user } = useAuth();
  const location = useLocation();
  if (user) {
    const from = (location.state as { from?: Location } | null)?.from;
    // The progress bar shows while the next page's code is fetched.
    return (
      <>
        <PageLoading />
        <Navigate to={destinationAfterSignIn(user.role, from)} replace />
      </>
    );
  }

  return (
    <Box sx={{ minHeight: '100vh', display: 'flex', flexDirection: 'column' }}>
      <PageTitle title="Sign in" />
      <SkipLink />
      <Box component="header" sx={{ px: { xs: 2, sm: 4 }, py: 2 }}>
        <Brand size={32} />
      </Box>
      <Box
        component="main"
        id={MAIN_CONTENT_ID}
        tabIndex={-1}
        sx={{
          flex: 1,
          display: 'flex',
          justifyContent: 'center',
          alignItems: 'flex-start',
          px: 2,
          pt: { xs: 2, sm: 8 },
          pb: 4,
          outline: 'none',
        }}
      >
        <Paper
          variant="outlined"
          sx={{
            width: '100%',
            maxWidth: 420,
            p: { xs: 3, sm: 4 },
            borderTop: 4,
            borderTopColor: 'primary.main',
          }}
        >
          <Typography variant="h1" sx={{ mb: 0.75 }}>
            Sign in
          </Typography>
          <Typography sx={{ mb: 3, color: 'text.secondary' }}>
            Elective advising, term data and demand outlook for the registrar&apos;s office.
          </Typography>
          <SignInForm />
          <Link
            component={RouterLink}
            to="/forgot-password"
            sx={{ display: 'inline-block', mt: 2 }}
          >
            Forgot your password?
          </Link>
        </Paper>
      </Box>
    </Box>
  );
}
