import { RequireAuth } from '../require-auth.tsx';
import { TopBar } from '../lab-shell.tsx';
import { PageHeader } from '../../components/ui/primitives.tsx';
import { NotificationSettingsCard } from '../../features/notifications/components/notification-settings-card.tsx';
import { TokensView } from '../../features/tokens/components/tokens-view.tsx';

export function Component() {
  return (
    <RequireAuth>
      {(me) => (
        <div className="min-h-screen">
          <TopBar me={me} />
          <div className="mx-auto max-w-3xl px-4 py-8 sm:px-6">
            <PageHeader title="Personal API tokens" subtitle="For scripts that upload captures or read results without a browser." />
            <TokensView />
            <div className="mt-8"><NotificationSettingsCard /></div>
          </div>
        </div>
      )}
    </RequireAuth>
  );
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
