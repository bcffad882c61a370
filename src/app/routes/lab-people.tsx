import { can } from '../../../shared/contracts/roles.ts';
import { PageHeader } from '../../components/ui/primitives.tsx';
import { PeopleView } from '../../features/people/components/people-view.tsx';
import { useLab } from '../lab-context.ts';

export function Component() {
  const { me, membership } = useLab();
  return (
    <>
      <PageHeader title="People" subtitle="Who works in this lab, and in which role." />
      <PeopleView labId={membership.labId} isAdmin={can(membership.role, 'members:manage')} myUserId={me.user.id} />
    </>
  );
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
