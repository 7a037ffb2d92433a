import { Navigate } from 'react-router';
import { useAuth } from '../features/auth/AuthProvider';
import { landingPathFor } from './pages';

export function HomeRedirect() {
  const { user } = useAuth();
  return <Navigate to={user ? landingPathFor(user.role) : '/sign-in'} replace />;
}
