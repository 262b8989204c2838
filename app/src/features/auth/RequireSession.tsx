import { Navigate, Outlet, useLocation } from 'react-router';
import { Loading, QueryError } from '../../components/QueryState';
import { withNext } from '../../lib/nextPath';
import { useMe } from './me';

/** Route guard: signed-out visitors go to sign-in and come back here afterwards. */
export function RequireSession() {
  const me = useMe();
  const location = useLocation();
  if (me.isPending) {
    return (
      <div className="p-8">
        <Loading label="Checking your session…" />
      </div>
    );
  }
  if (me.isError) {
    return (
      <div className="p-8">
        <QueryError error={me.error} what="your session" onRetry={() => void me.refetch()} />
      </div>
    );
  }
  if (!me.data) return <Navigate to={withNext('/sign-in', location.pathname + location.search)} replace />;
  return <Outlet />;
}
