import { isRouteErrorResponse, useRouteError } from 'react-router';
import Box from '@mui/material/Box';
import Link from '@mui/material/Link';
import Typography from '@mui/material/Typography';
import { Brand } from '../components/Brand';
import { PageTitle } from '../components/PageTitle';
import { MAIN_CONTENT_ID } from '../components/SkipLink';

/** The last resort when a page fails to render: say so plainly instead of a blank screen. */
export function RouteErrorPage() {
  const error = useRouteError();
  const detail = isRouteErrorResponse(error)
    ? `${error.status} ${error.statusText}`
    : error instanceof Error
      ? error.message
      : undefined;
  return (
    <Box sx={{ minHeight: '100vh', bgcolor: 'background.default' }}>
      <PageTitle title="Something went wrong" />
      <Box component="header" sx={{ px: 3, py: 2 }}>
        <Brand />
      </Box>
      <Box component="main" id={MAIN_CONTENT_ID} sx={{ px: 3, py: 4, maxWidth: '70ch' }}>
        <Typography variant="h1" sx={{ mb: 2 }}>
          Something went wrong
        </Typography>
        <Typography sx={{ mb: 2 }}>
          This page could not be shown. Reloading usually helps; if it keeps happening, tell your
          Kinpath administrator what you were doing.
        </Typography>
        {detail ? (
          <Typography sx={{ mb: 2, color: 'text.secondary' }}>Details: {detail}</Typography>
        ) : null}
        {/* A full reload, not client-side navigation: the app's state may be what failed. */}
        <Link href="/">Go to the home page</Link>
      </Box>
    </Box>
  );
}
