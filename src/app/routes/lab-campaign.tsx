import { useParams } from 'react-router-dom';
import { can } from '../../../shared/contracts/roles.ts';
import { CampaignShots } from '../../features/campaigns/components/campaign-shots.tsx';
import { DropToNewShot } from '../../features/shots/components/drop-to-new-shot.tsx';
import { useLab } from '../lab-context.ts';

export function Component() {
  const { membership } = useLab();
  const { campaignId = '' } = useParams();
  const canWrite = can(membership.role, 'shots:write');
  const canRecompute = can(membership.role, 'analyses:write');
  return (
    <div className="space-y-4">
      <CampaignShots labId={membership.labId} campaignId={campaignId} canWrite={canWrite} canRecompute={canRecompute} />
      {canWrite && <DropToNewShot labId={membership.labId} campaignId={campaignId} />}
    </div>
  );
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
