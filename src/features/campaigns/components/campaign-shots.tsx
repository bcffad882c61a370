import { useState } from 'react';
import { Link } from 'react-router-dom';
import { Button, Card, ErrorNote, Loading, PageHeader } from '../../../components/ui/primitives.tsx';
import { useCampaign } from '../api/campaigns.ts';
import { useShotList } from '../api/shot-list.ts';
import { NewShotForm } from './new-shot-form.tsx';
import { ShotTable } from './shot-table.tsx';

/** The campaign page: its shots (sorted, filtered and paged by the server) and, for those who log shots, a new one. */
export function CampaignShots({ labId, campaignId, canWrite, canRecompute = false }: { labId: string; campaignId: string; canWrite: boolean; canRecompute?: boolean }) {
  const q = useCampaign(labId, campaignId);
  const [creating, setCreating] = useState(false);
  // The latest shot, to carry its seal, projectile and rig into the form.
  const latest = useShotList(labId, { campaignId, sort: 'number', direction: 'desc', status: '', q: '', limit: 1, offset: 0 });
  if (q.isPending) return <Loading what="Loading the campaign" />;
  if (q.isError) return <ErrorNote error={q.error} />;
  const { campaign } = q.data;
  return (
    <>
      <PageHeader
        title={campaign.name}
        subtitle={campaign.description || undefined}
        actions={
          <div className="flex items-center gap-3">
            <Link to=".." relative="path" className="text-sm font-medium text-harbour-600 hover:underline">All campaigns</Link>
            <Link to={`/labs/${labId}/campaigns/${campaignId}/trends`} className="text-sm font-medium text-harbour-600 hover:underline">Trends</Link>
            <Link to={`/labs/${labId}/campaigns/${campaignId}/bench`} className="text-sm font-medium text-harbour-600 hover:underline">Bench display</Link>
            {canRecompute && <Link to={`/labs/${labId}/campaigns/${campaignId}/batch`} className="text-sm font-medium text-harbour-600 hover:underline">Recompute several</Link>}
            {canWrite && !creating && <Button onClick={() => setCreating(true)}>New shot</Button>}
          </div>
        }
      />
      <div className="space-y-6">
        {creating && (
          <Card title="New shot">
            {latest.isPending ? <Loading /> : (
              <NewShotForm labId={labId} campaignId={campaignId} previous={latest.data?.shots[0] ?? null} onCancel={() => setCreating(false)} />
            )}
          </Card>
        )}
        <Card title="Shots">
          <ShotTable labId={labId} campaignId={campaignId} canWrite={canWrite} />
        </Card>
      </div>
    </>
  );
}
