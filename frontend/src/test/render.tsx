import { render } from '@testing-library/react';
import { RouterProvider, createMemoryRouter, type RouteObject } from 'react-router';
import type { ReactElement } from 'react';
import type { Role, UserSummary } from '@kinpath/contracts';
import { AppProviders } from '../app/App';
import { createQueryClient } from '../app/query-client';
import { routes } from '../app/routes';
import { setSession } from '../features/auth/session';

export const DEMO_USERS: Record<Role, UserSummary> = {
  admin: {
    id: 'u-admin',
    email: 'admin@halden.example',
    displayName: 'Ines Marlow',
    role: 'admin',
    department: null,
  },
  registrar: {
    id: 'u-registrar',
    email: 'registrar@halden.example',
    displayName: 'Tobias Fenwright',
    role: 'registrar',
    department: null,
  },
  advisor: {
    id: 'u-advisor',
    email: 'advisor@halden.example',
    displayName: 'Priya Okonkwo-Hale',
    role: 'advisor',
    department: null,
  },
  department_head: {
    id: 'u-head',
    email: 'head.cmp@halden.example',
    displayName: 'Ruth Calloway',
    role: 'department_head',
    department: 'CMP',
  },
};

export function signInAs(role: Role): UserSummary {
  const user = DEMO_USERS[role];
  setSession({ token: `token-for-${role}`, user });
  return user;
}

function testQueryClient() {
  const client = createQueryClient();
  client.setDefaultOptions({
    queries: { retry: false, staleTime: 0 },
    mutations: { retry: false },
  });
  return client;
}

/**
 * The routes with every page's code fetched up front, so that a test starts from the app as it
 * is once its pages have loaded (`lazy-pages.test.tsx` covers the loading itself).
 */
async function loaded(tree: RouteObject[]): Promise<RouteObject[]> {
  return Promise.all(
    tree.map(async ({ lazy, children, ...route }) => ({
      ...route,
      ...(typeof lazy === 'function' ? await lazy() : {}),
      ...(children ? { children: await loaded(children) } : {}),
    })),
  ) as Promise<RouteObject[]>;
}

const LOADED_ROUTES = await loaded(routes);

/** The whole app at `path`, with the real routes, in memory. */
export function renderApp(path: string) {
  const router = createMemoryRouter(LOADED_ROUTES, { initialEntries: [path] });
  const result = render(
    <AppProviders queryClient={testQueryClient()}>
      <RouterProvider router={router} />
    </AppProviders>,
  );
  return { ...result, router };
}

/** One component with the app's providers but no router. */
export function renderWithProviders(ui: ReactElement) {
  return render(<AppProviders queryClient={testQueryClient()}>{ui}</AppProviders>);
}
