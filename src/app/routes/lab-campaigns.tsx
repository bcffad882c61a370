import { can } from '../../../shared/contracts/roles.ts';
import { PageHeader } from '../../components/ui/primitives.tsx';
import { CampaignList } from '../../features/campaigns/components/campaign-list.tsx';
import { SafetyNote } from '../../features/labs/components/safety-note.tsx';
import { useLab } from '../lab-context.ts';

export function Component() {
  const { membership } = useLab();
  return (
    <>
      <PageHeader title={membership.labName} subtitle="Campaigns group the shots of one question: a vacuum sweep, a seal comparison, a new rig." />
      <div className="space-y-6">
        <CampaignList labId={membership.labId} canCreate={can(membership.role, 'campaigns:write')} />
        <SafetyNote />
      </div>
    </>
  );
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
