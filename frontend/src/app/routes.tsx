import type { ComponentType } from 'react';
import type { RouteObject } from 'react-router';
import { ForgotPasswordPage } from '../features/accounts/routes/ForgotPasswordPage';
import { InvitationPage, ResetPasswordPage } from '../features/accounts/routes/SetPasswordPage';
import { SignInPage } from '../features/auth/routes/SignInPage';
import { AppShell } from './AppShell';
import { HomeRedirect } from './HomeRedirect';
import { NotFoundPage } from './NotFoundPage';
import { PageLoadError, PageLoading, loadPage } from './PageLoad';
import { PAGES, type RolePage } from './pages';
import { RequireRole } from './RequireRole';
import { RouteErrorPage } from './RouteErrorPage';

/** A page behind its role check, whose code is fetched the first time it is opened. */
function rolePage(
  page: RolePage,
  load: () => Promise<ComponentType>,
  path: string = page.path,
): RouteObject {
  return {
    path,
    lazy: async () => {
      const Page = await loadPage(load);
      return {
        element: (
          <RequireRole page={page}>
            <Page />
          </RequireRole>
        ),
      };
    },
  };
}

export const routes: RouteObject[] = [
  // Sign-in, the e-mailed links and the shell come with the first download; the pages after
  // sign-in follow when opened.
  { path: '/sign-in', element: <SignInPage />, errorElement: <RouteErrorPage /> },
  // Reached from e-mailed links, without signing in.
  { path: '/invitation/:token', element: <InvitationPage />, errorElement: <RouteErrorPage /> },
  {
    path: '/reset-password/:token',
    element: <ResetPasswordPage />,
    errorElement: <RouteErrorPage />,
  },
  { path: '/forgot-password', element: <ForgotPasswordPage />, errorElement: <RouteErrorPage /> },
  {
    path: '/',
    element: <AppShell />,
    errorElement: <RouteErrorPage />,
    children: [
      { index: true, element: <HomeRedirect /> },
      {
        // Inside the shell: the progress bar while a page first opens, a reload if it fails.
        hydrateFallbackElement: <PageLoading />,
        errorElement: <PageLoadError />,
        children: [
          rolePage(PAGES.advising, () =>
            import('../features/advising/routes/AdvisingPage').then((m) => m.AdvisingPage),
          ),
          rolePage(
            PAGES.advising,
            () => import('../features/advising/routes/StudentPage').then((m) => m.StudentPage),
            // The student number never appears here: only the opaque ref the lookup hands out.
            `${PAGES.advising.path}/students/:ref`,
          ),
          rolePage(PAGES.registrar, () =>
            import('../features/registrar/routes/RegistrarPage').then((m) => m.RegistrarPage),
          ),
          rolePage(PAGES.imports, () =>
            import('../features/imports/routes/ImportsPage').then((m) => m.ImportsPage),
          ),
          rolePage(PAGES.catalogue, () =>
            import('../features/catalogue/routes/CataloguePage').then((m) => m.CataloguePage),
          ),
          rolePage(PAGES.gradeScale, () =>
            import('../features/grade-scale/routes/GradeScalePage').then((m) => m.GradeScalePage),
          ),
          rolePage(PAGES.modelSettings, () =>
            import('../features/model/routes/ModelSettingsPage').then((m) => m.ModelSettingsPage),
          ),
          rolePage(PAGES.backtests, () =>
            import('../features/model/routes/BacktestsPage').then((m) => m.BacktestsPage),
          ),
          rolePage(PAGES.outlook, () =>
            import('../features/outlook/routes/OutlookPage').then((m) => m.OutlookPage),
          ),
          rolePage(PAGES.users, () =>
            import('../features/users/routes/UsersPage').then((m) => m.UsersPage),
          ),
          rolePage(PAGES.audit, () =>
            import('../features/audit/routes/AuditPage').then((m) => m.AuditPage),
          ),
          rolePage(PAGES.scriptTokens, () =>
            import('../features/api-tokens/routes/ScriptTokensPage').then(
              (m) => m.ScriptTokensPage,
            ),
          ),
        ],
      },
      { path: '*', element: <NotFoundPage /> },
    ],
  },
];
