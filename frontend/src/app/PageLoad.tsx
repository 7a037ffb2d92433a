import type { ComponentType } from 'react';
import { useRouteError } from 'react-router';
import Button from '@mui/material/Button';
import LinearProgress from '@mui/material/LinearProgress';
import Typography from '@mui/material/Typography';
import { PageHeader } from '../components/PageHeader';

/** A page's code that could not be fetched: a new release replaced it, or the connection dropped. */
export class PageLoadFailure extends Error {
  constructor(cause: unknown) {
    super('The page could not be loaded.', { cause });
    this.name = 'PageLoadFailure';
  }
}

/** Fetches a page's code the first time it is opened, marking a failure as a page-load failure. */
export async function loadPage(load: () => Promise<ComponentType>): Promise<ComponentType> {
  try {
    return await load();
  } catch (cause) {
    throw new PageLoadFailure(cause);
  }
}

/** Shown while a page's code is on its way. */
export function PageLoading() {
  return <LinearProgress aria-label="Loading the page" />;
}

/**
 * Offers a reload when a page's code could not be fetched; the navigation stays usable. Any
 * other failure goes on to the app's own error page.
 */
export function PageLoadError() {
  const error = useRouteError();
  if (!(error instanceof PageLoadFailure)) throw error;
  return (
    <>
      <PageHeader title="This page could not be loaded" />
      <Typography sx={{ maxWidth: '70ch', mb: 3 }}>
        Kinpath may have been updated since this window was opened, or the connection dropped.
        Reloading fetches the page again; nothing you saved is lost.
      </Typography>
      {/* A full reload: it also picks up a new release's files. */}
      <Button variant="contained" onClick={() => window.location.reload()}>
        Reload the page
      </Button>
    </>
  );
}
