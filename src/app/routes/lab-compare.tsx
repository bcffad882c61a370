import { useQuery } from '@tanstack/react-query';
import { Link, useSearchParams } from 'react-router-dom';
import { EmptyState, ErrorNote, Loading, PageHeader } from '../../components/ui/primitives.tsx';
import { campaignsQueryOptions } from '../../features/campaigns/api/campaigns.ts';
import { useComparedShots } from '../../features/compare/api/compared-shots.ts';
import type { ShotNames } from '../../features/compare/api/types.ts';
import { CompareView } from '../../features/compare/components/compare-view.tsx';
import { gateRigsQueryOptions, projectilesQueryOptions } from '../../features/library/api/library.ts';
import { useLab } from '../lab-context.ts';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** /labs/:labId/compare?shots=a,b,c: two to four shots side by side and overlaid. */
export function Component() {
  const { membership } = useLab();
  const labId = membership.labId;
  const [params] = useSearchParams();
  const ids = [...new Set((params.get('shots') ?? '').split(',').map((s) => s.trim()).filter(Boolean))];
  const bad = ids.filter((id) => !UUID.test(id));
  const valid = bad.length === 0 && ids.length >= 2 && ids.length <= 4;
  const shots = useComparedShots(valid ? ids : []);
  const projectiles = useQuery(projectilesQueryOptions(labId));
  const rigs = useQuery(gateRigsQueryOptions(labId));
  const campaigns = useQuery(campaignsQueryOptions(labId));

  const header = <PageHeader title="Compare shots" subtitle="Traces aligned at a gate’s crossing, one zoom for all; results, conditions and differing analysis settings with them." />;
  if (!valid) {
    return (
      <>
        {header}
        <EmptyState title={bad.length > 0 ? `“${bad[0]}” is not a shot id` : `Pick two to four shots (${ids.length} given)`}>
          Tick shots in the <Link className="underline" to={`/labs/${labId}/review-queue`}>review queue</Link> or a campaign’s table and press Compare.
        </EmptyState>
      </>
    );
  }
  if (shots.error) return <>{header}<ErrorNote error={shots.error} /></>;
  if (!shots.data) return <>{header}<Loading what="Loading the shots" /></>;
  const data = shots.data;
  const names: ShotNames[] = data.map((d) => {
    const rig = rigs.data?.gateRigs.find((r) => r.id === d.shot.gateRigId);
    return {
      campaignName: campaigns.data?.campaigns.find((c) => c.id === d.shot.campaignId)?.name ?? null,
      projectileName: projectiles.data?.projectiles.find((p) => p.id === d.shot.projectileId)?.name ?? null,
      rigName: rig?.name ?? null,
      gateLabels: (rig?.gates ?? []).map((g) => ({ position: g.position_m, label: g.label })),
    };
  });
  return (
    <>
      {header}
      <CompareView labId={labId} shots={data} names={names} />
    </>
  );
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
