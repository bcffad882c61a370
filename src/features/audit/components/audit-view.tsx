import { Card, EmptyState, ErrorNote, Loading } from '../../../components/ui/primitives.tsx';
import { formatDateTime } from '../../../lib/format.ts';
import { useAudit } from '../api/audit.ts';

const ACTION_LABELS: Record<string, string> = {
  'invitation.sent': 'sent an invitation',
  'invitation.accepted': 'accepted an invitation',
  'invitation.withdrawn': 'withdrew an invitation',
  'member.role_changed': "changed a member's role",
  'member.removed': 'removed a member',
  'campaign.created': 'started a campaign',
};

function describe(details: Record<string, unknown>): string {
  return Object.entries(details).map(([k, v]) => `${k}: ${String(v)}`).join(', ');
}

export function AuditView({ labId }: { labId: string }) {
  const audit = useAudit(labId);
  return (
    <Card title="Events">
      <p className="mb-4 text-sm text-harbour-500">Every change in this lab, newest first. Entries can be added, never edited or removed.</p>
      {audit.isPending && <Loading />}
      {audit.isError && <ErrorNote error={audit.error} />}
      {audit.data?.events.length === 0 && <EmptyState title="Nothing recorded yet" />}
      {audit.data && audit.data.events.length > 0 && (
        <ol className="divide-y divide-harbour-100 text-sm">
          {audit.data.events.map((e) => (
            <li key={e.id} className="grid gap-1 py-2 sm:grid-cols-[11rem_1fr]">
              <span className="tabular-nums text-harbour-500">{formatDateTime(e.at)}</span>
              <span>
                <span className="font-medium">{e.actor ?? 'Someone'}</span> {ACTION_LABELS[e.action] ?? e.action}
                {Object.keys(e.details).length > 0 && <span className="text-harbour-500"> — {describe(e.details)}</span>}
              </span>
            </li>
          ))}
        </ol>
      )}
    </Card>
  );
}
