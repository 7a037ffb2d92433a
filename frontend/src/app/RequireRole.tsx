import type { ReactNode } from 'react';
import { Navigate, useLocation } from 'react-router';
import { useAuth } from '../features/auth/AuthProvider';
import { NotAvailablePage } from './NotAvailablePage';
import type { RolePage } from './pages';

/** Signed-out visitors go to sign-in (and come back after); other roles get a clear refusal. */
export function RequireRole({ page, children }: { page: RolePage; children: ReactNode }) {
  const { user } = useAuth();
  const location = useLocation();
  if (!user) return <Navigate to="/sign-in" replace state={{ from: location }} />;
  if (!page.roles.includes(user.role)) return <NotAvailablePage page={page} />;
  return children;
}
