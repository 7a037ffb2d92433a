export const APP_NAME = 'Kinpath';

export function pageTitle(title: string): string {
  return `${title} · ${APP_NAME}`;
}

/** Sets the browser tab's title; React places `<title>` in the document head. */
export function PageTitle({ title }: { title: string }) {
  return <title>{pageTitle(title)}</title>;
}
