import { Link } from 'react-router-dom';
import { RequireAuth } from '../require-auth.tsx';
import { TopBar } from '../lab-shell.tsx';
import { PageHeader } from '../../components/ui/primitives.tsx';
import { ChangePasswordCard } from '../../features/account/components/change-password-card.tsx';
import { SignOutEverywhereCard } from '../../features/account/components/sign-out-everywhere-card.tsx';

export function Component() {
  return (
    <RequireAuth>
      {(me) => (
        <div className="min-h-screen">
          <TopBar me={me} />
          <div className="mx-auto max-w-3xl space-y-6 px-4 py-8 sm:px-6">
            <PageHeader
              title="Your account"
              subtitle={<>{me.user.name} · {me.user.email} · <Link to="/account/tokens" className="text-harbour-700 underline">API tokens and notifications</Link></>}
            />
            <ChangePasswordCard />
            <SignOutEverywhereCard />
          </div>
        </div>
      )}
    </RequireAuth>
  );
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
