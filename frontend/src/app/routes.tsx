import type { RouteObject } from 'react-router';
import { AdvisingPage } from '../features/advising/routes/AdvisingPage';
import { SignInPage } from '../features/auth/routes/SignInPage';
import { OutlookPage } from '../features/outlook/routes/OutlookPage';
import { RegistrarPage } from '../features/registrar/routes/RegistrarPage';
import { UsersPage } from '../features/users/routes/UsersPage';
import { AppShell } from './AppShell';
import { HomeRedirect } from './HomeRedirect';
import { NotFoundPage } from './NotFoundPage';
import { PAGES } from './pages';
import { RequireRole } from './RequireRole';
import { RouteErrorPage } from './RouteErrorPage';

export const routes: RouteObject[] = [
  { path: '/sign-in', element: <SignInPage />, errorElement: <RouteErrorPage /> },
  {
    path: '/',
    element: <AppShell />,
    errorElement: <RouteErrorPage />,
    children: [
      { index: true, element: <HomeRedirect /> },
      {
        path: PAGES.advising.path,
        element: (
          <RequireRole page={PAGES.advising}>
            <AdvisingPage />
          </RequireRole>
        ),
      },
      {
        path: PAGES.registrar.path,
        element: (
          <RequireRole page={PAGES.registrar}>
            <RegistrarPage />
          </RequireRole>
        ),
      },
      {
        path: PAGES.outlook.path,
        element: (
          <RequireRole page={PAGES.outlook}>
            <OutlookPage />
          </RequireRole>
        ),
      },
      {
        path: PAGES.users.path,
        element: (
          <RequireRole page={PAGES.users}>
            <UsersPage />
          </RequireRole>
        ),
      },
      { path: '*', element: <NotFoundPage /> },
    ],
  },
];
