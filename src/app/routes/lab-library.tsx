import { can } from '../../../shared/contracts/roles.ts';
import { PageHeader } from '../../components/ui/primitives.tsx';
import { LibraryView } from '../../features/library/components/library-view.tsx';
import { useLab } from '../lab-context.ts';

export function Component() {
  const { membership } = useLab();
  return (
    <>
      <PageHeader title="Projectiles & rigs" subtitle="Sizes, masses and gate positions with their tolerances: they feed every speed and its uncertainty." />
      <LibraryView labId={membership.labId} canWrite={can(membership.role, 'library:write')} />
    </>
  );
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
