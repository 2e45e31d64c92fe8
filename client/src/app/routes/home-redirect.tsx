import { Navigate } from 'react-router';
import { ROLE_HOME } from '@shared/auth/roles';
import { useSessionUser } from '../session';

/** "/" is nobody's screen: each role lands on its own home. */
export function HomeRedirect() {
  const user = useSessionUser();
  return <Navigate to={ROLE_HOME[user.role]} replace />;
}
