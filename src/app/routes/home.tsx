import { Navigate } from 'react-router-dom';
import { RequireAuth } from '../require-auth.tsx';
import { TopBar } from '../lab-shell.tsx';
import { EmptyState } from '../../components/ui/primitives.tsx';

/** "/" opens the user's first lab; someone in no lab is told how to get into one. */
export function Component() {
  return (
    <RequireAuth>
      {(me) =>
        me.memberships.length > 0 ? (
          <Navigate to={`/labs/${me.memberships[0].labId}/campaigns`} replace />
        ) : (
          <div className="min-h-screen">
            <TopBar me={me} />
            <div className="mx-auto max-w-lg px-6 py-16">
              <EmptyState title="You are not in any lab yet">Ask a lab admin to invite you; the link in their e-mail adds you to the lab.</EmptyState>
            </div>
          </div>
        )
      }
    </RequireAuth>
  );
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
