import { useEffect } from 'react';

export const APP_NAME = 'Kinpath';

export function pageTitle(title: string): string {
  return `${title} · ${APP_NAME}`;
}

/**
 * Sets the browser tab's title on the one `<title>` of index.html. Rendering a `<title>` element
 * instead would add a second one to the head beside it.
 */
export function PageTitle({ title }: { title: string }) {
  useEffect(() => {
    document.title = pageTitle(title);
  }, [title]);
  return null;
}
