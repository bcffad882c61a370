import { useQuery } from '@tanstack/react-query';
import { useParams } from 'react-router-dom';
import { can } from '../../../shared/contracts/roles.ts';
import { campaignQueryOptions } from '../../features/campaigns/api/campaigns.ts';
import { gateRigsQueryOptions, projectilesQueryOptions } from '../../features/library/api/library.ts';
import { NewShotForm } from '../../features/campaigns/components/new-shot-form.tsx';
import { ReviewBar } from '../../features/reviews/components/review-bar.tsx';
import { ShotPage } from '../../features/shots/components/shot-page.tsx';
import { shotQueryOptions } from '../../features/shots/api/shot.ts';
import { SafetyCaution } from '../../features/labs/components/safety-note.tsx';
import { useLab } from '../lab-context.ts';

/** The shot workspace; the route gathers the lab's names (campaign, projectile, rig) the page shows. */
export function Component() {
  const { membership } = useLab();
  const { shotId = '' } = useParams();
  const labId = membership.labId;
  const shot = useQuery(shotQueryOptions(shotId));
  const campaignId = shot.data?.shot.campaignId;
  const campaign = useQuery({ ...campaignQueryOptions(labId, campaignId ?? ''), enabled: !!campaignId });
  const projectiles = useQuery(projectilesQueryOptions(labId));
  const rigs = useQuery(gateRigsQueryOptions(labId));
  const projectile = projectiles.data?.projectiles.find((p) => p.id === shot.data?.shot.projectileId);
  const rig = rigs.data?.gateRigs.find((r) => r.id === shot.data?.shot.gateRigId);
  return (
    <ShotPage
      shotId={shotId}
      campaignName={campaign.data?.campaign.name ?? null}
      campaignPath={campaignId ? `/labs/${labId}/campaigns/${campaignId}` : `/labs/${labId}/campaigns`}
      projectileName={projectile?.name ?? null}
      rigName={rig?.name ?? null}
      rigLabels={(rig?.gates ?? []).map((g) => ({ position: g.position_m, label: g.label }))}
      labId={labId}
      canUpload={can(membership.role, 'shots:write')}
      canRecompute={can(membership.role, 'analyses:write')}
      canRestore={can(membership.role, 'shots:restore')}
      conditionsEditor={(close) => shot.data && (
        <NewShotForm labId={labId} campaignId={shot.data.shot.campaignId} previous={null} editing={shot.data.shot} onCancel={close} onSaved={close} />
      )}
      aside={
        <ReviewBar
          shotId={shotId}
          labId={labId}
          status={shot.data?.shot.status ?? ''}
          current={shot.data?.currentAnalysis ? { version: shot.data.currentAnalysis.version, state: shot.data.currentAnalysis.state } : null}
          canRequest={can(membership.role, 'reviews:request')}
          canDecide={can(membership.role, 'reviews:decide')}
          approvalBlocked={shot.data?.currentAnalysis?.timeBaseCheck?.blocksApproval
            ? 'Cannot be signed off yet: this version is marked “check the time base”. An analyst must confirm the read or fix it in a new version; return it to ask for that.'
            : null}
          canReadAudit={can(membership.role, 'audit:read')}
          campaignShots={campaign.data?.shots.map((s) => ({ id: s.id, number: s.number })) ?? []}
        >
          <SafetyCaution />
        </ReviewBar>
      }
    />
  );
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
