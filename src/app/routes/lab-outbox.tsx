import { can } from '../../../shared/contracts/roles.ts';
import { PageHeader } from '../../components/ui/primitives.tsx';
import { OutboxView } from '../../features/outbox/components/outbox-view.tsx';
import { useLab } from '../lab-context.ts';
import { NotFoundPage } from './not-found.tsx';

export function Component() {
  const { membership } = useLab();
  if (!can(membership.role, 'outbox:read')) return <NotFoundPage message="The mail outbox is open to lab admins." />;
  return (
    <>
      <PageHeader title="Mail outbox" />
      <OutboxView labId={membership.labId} />
    </>
  );
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
