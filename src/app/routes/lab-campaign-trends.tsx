import { can } from '../../../shared/contracts/roles.ts';
import { useQuery } from '@tanstack/react-query';
import { Link, useParams } from 'react-router-dom';
import { PageHeader } from '../../components/ui/primitives.tsx';
import { campaignQueryOptions } from '../../features/campaigns/api/campaigns.ts';
import { projectilesQueryOptions } from '../../features/library/api/library.ts';
import { TrendsView } from '../../features/trends/components/trends-view.tsx';
import { useLab } from '../lab-context.ts';

/** /labs/:labId/campaigns/:campaignId/trends */
export function Component() {
  const { membership } = useLab();
  const labId = membership.labId;
  const { campaignId = '' } = useParams();
  const campaign = useQuery(campaignQueryOptions(labId, campaignId));
  const projectiles = useQuery(projectilesQueryOptions(labId));
  const name = campaign.data?.campaign.name ?? 'Campaign';
  return (
    <>
      <p className="text-sm text-harbour-500"><Link to={`/labs/${labId}/campaigns/${campaignId}`} className="hover:underline">{name}</Link></p>
      <PageHeader title="Trends" subtitle="Measured speeds across the campaign, next to what a simple launcher model predicts." />
      <TrendsView
        labId={labId}
        campaignId={campaignId}
        canEditCampaign={can(membership.role, 'campaigns:write')}
        projectiles={(projectiles.data?.projectiles ?? []).map((p) => ({ id: p.id, name: p.name, massKg: p.massKg, diameterM: p.diameterM }))}
      />
    </>
  );
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
