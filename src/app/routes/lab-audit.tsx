import { can } from '../../../shared/contracts/roles.ts';
import { PageHeader } from '../../components/ui/primitives.tsx';
import { AuditView } from '../../features/audit/components/audit-view.tsx';
import { useLab } from '../lab-context.ts';
import { NotFoundPage } from './not-found.tsx';

export function Component() {
  const { membership } = useLab();
  if (!can(membership.role, 'audit:read')) return <NotFoundPage message="The audit trail is open to admins and reviewers." />;
  return (
    <>
      <PageHeader title="Audit trail" />
      <AuditView labId={membership.labId} />
    </>
  );
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
