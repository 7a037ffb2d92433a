import type { RouteObject } from 'react-router';
import { AdvisingPage } from '../features/advising/routes/AdvisingPage';
import { StudentPage } from '../features/advising/routes/StudentPage';
import { ForgotPasswordPage } from '../features/accounts/routes/ForgotPasswordPage';
import { InvitationPage, ResetPasswordPage } from '../features/accounts/routes/SetPasswordPage';
import { AuditPage } from '../features/audit/routes/AuditPage';
import { SignInPage } from '../features/auth/routes/SignInPage';
import { OutlookPage } from '../features/outlook/routes/OutlookPage';
import { RegistrarPage } from '../features/registrar/routes/RegistrarPage';
import { ImportsPage } from '../features/imports/routes/ImportsPage';
import { CataloguePage } from '../features/catalogue/routes/CataloguePage';
import { GradeScalePage } from '../features/grade-scale/routes/GradeScalePage';
import { BacktestsPage } from '../features/model/routes/BacktestsPage';
import { ModelSettingsPage } from '../features/model/routes/ModelSettingsPage';
import { UsersPage } from '../features/users/routes/UsersPage';
import { AppShell } from './AppShell';
import { HomeRedirect } from './HomeRedirect';
import { NotFoundPage } from './NotFoundPage';
import { PAGES } from './pages';
import { RequireRole } from './RequireRole';
import { RouteErrorPage } from './RouteErrorPage';

export const routes: RouteObject[] = [
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
        path: PAGES.advising.path,
        element: (
          <RequireRole page={PAGES.advising}>
            <AdvisingPage />
          </RequireRole>
        ),
      },
      {
        // The student number never appears here: only the opaque ref the lookup hands out.
        path: `${PAGES.advising.path}/students/:ref`,
        element: (
          <RequireRole page={PAGES.advising}>
            <StudentPage />
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
        path: PAGES.imports.path,
        element: (
          <RequireRole page={PAGES.imports}>
            <ImportsPage />
          </RequireRole>
        ),
      },
      {
        path: PAGES.catalogue.path,
        element: (
          <RequireRole page={PAGES.catalogue}>
            <CataloguePage />
          </RequireRole>
        ),
      },
      {
        path: PAGES.gradeScale.path,
        element: (
          <RequireRole page={PAGES.gradeScale}>
            <GradeScalePage />
          </RequireRole>
        ),
      },
      {
        path: PAGES.modelSettings.path,
        element: (
          <RequireRole page={PAGES.modelSettings}>
            <ModelSettingsPage />
          </RequireRole>
        ),
      },
      {
        path: PAGES.backtests.path,
        element: (
          <RequireRole page={PAGES.backtests}>
            <BacktestsPage />
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
      {
        path: PAGES.audit.path,
        element: (
          <RequireRole page={PAGES.audit}>
            <AuditPage />
          </RequireRole>
        ),
      },
      { path: '*', element: <NotFoundPage /> },
    ],
  },
];
