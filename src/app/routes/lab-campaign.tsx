import { useParams } from 'react-router-dom';
import { can } from '../../../shared/contracts/roles.ts';
import { CampaignShots } from '../../features/campaigns/components/campaign-shots.tsx';
import { useLab } from '../lab-context.ts';

export function Component() {
  const { membership } = useLab();
  const { campaignId = '' } = useParams();
  return <CampaignShots labId={membership.labId} campaignId={campaignId} canWrite={can(membership.role, 'shots:write')} />;
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
