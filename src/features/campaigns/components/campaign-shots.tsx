import { Link } from 'react-router-dom';
import { Badge, Card, EmptyState, ErrorNote, Loading, PageHeader } from '../../../components/ui/primitives.tsx';
import { formatCelsius, formatDateTime, formatKpa } from '../../../lib/format.ts';
import { useCampaign } from '../api/campaigns.ts';

const STATUS_LABELS: Record<string, { label: string; tone: 'neutral' | 'signal' | 'good' | 'bad' }> = {
  draft: { label: 'Awaiting files', tone: 'neutral' },
  processing: { label: 'Processing', tone: 'signal' },
  analysed: { label: 'Analysed', tone: 'neutral' },
  in_review: { label: 'In review', tone: 'signal' },
  approved: { label: 'Signed off', tone: 'good' },
  returned: { label: 'Returned', tone: 'bad' },
  failed: { label: 'Failed', tone: 'bad' },
};

export function CampaignShots({ labId, campaignId }: { labId: string; campaignId: string }) {
  const q = useCampaign(labId, campaignId);
  if (q.isPending) return <Loading what="Loading the campaign" />;
  if (q.isError) return <ErrorNote error={q.error} />;
  const { campaign, shots } = q.data;
  return (
    <>
      <PageHeader
        title={campaign.name}
        subtitle={campaign.description || undefined}
        actions={<Link to=".." relative="path" className="text-sm font-medium text-harbour-600 hover:underline">All campaigns</Link>}
      />
      <Card title={`Shots (${shots.length})`}>
        {shots.length === 0 ? (
          <EmptyState title="No shots in this campaign yet">Shots appear here as experimenters log them.</EmptyState>
        ) : (
          <div className="-mx-5 overflow-x-auto">
            <table className="min-w-full text-sm">
              <thead className="text-left text-xs uppercase tracking-wide text-harbour-500">
                <tr>
                  <th scope="col" className="px-5 py-2 font-medium">Shot</th>
                  <th scope="col" className="px-3 py-2 font-medium">Fired</th>
                  <th scope="col" className="px-3 py-2 text-right font-medium">Tube pressure</th>
                  <th scope="col" className="px-3 py-2 font-medium">Seal</th>
                  <th scope="col" className="px-3 py-2 text-right font-medium">Ambient</th>
                  <th scope="col" className="px-5 py-2 font-medium">Status</th>
                </tr>
              </thead>
              <tbody className="divide-y divide-harbour-100">
                {shots.map((s) => {
                  const status = STATUS_LABELS[s.status] ?? { label: s.status, tone: 'neutral' as const };
                  return (
                    <tr key={s.id} className="hover:bg-harbour-50">
                      <td className="px-5 py-2 font-medium tabular-nums">#{s.number}</td>
                      <td className="px-3 py-2 tabular-nums text-harbour-700">{formatDateTime(s.firedAt)}</td>
                      <td className="px-3 py-2 text-right tabular-nums">{formatKpa(s.conditions.tubePressurePa)}</td>
                      <td className="px-3 py-2 text-harbour-700">{s.conditions.sealType || '—'}</td>
                      <td className="px-3 py-2 text-right tabular-nums text-harbour-700">
                        {formatCelsius(s.conditions.ambientTemperatureK)}, {formatKpa(s.conditions.ambientPressurePa, 4)}
                      </td>
                      <td className="px-5 py-2"><Badge tone={status.tone}>{status.label}</Badge></td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
        )}
      </Card>
    </>
  );
}
