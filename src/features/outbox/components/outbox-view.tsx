import { Card, EmptyState, ErrorNote, Loading } from '../../../components/ui/primitives.tsx';
import { formatDateTime } from '../../../lib/format.ts';
import { useOutbox } from '../api/outbox.ts';

/** What the local test mail server received for this lab, so invitations can be followed without real e-mail. */
export function OutboxView({ labId }: { labId: string }) {
  const outbox = useOutbox(labId);
  return (
    <Card title="Received messages">
      <p className="mb-4 text-sm text-harbour-500">
        This installation delivers mail to a local stand-in server instead of a real mail relay. Messages about this lab appear here.
      </p>
      {outbox.isPending && <Loading />}
      {outbox.isError && <ErrorNote error={outbox.error} />}
      {outbox.data?.messages.length === 0 && <EmptyState title="No mail yet">Invite someone from People; the message will show here.</EmptyState>}
      <ul className="space-y-4">
        {outbox.data?.messages.map((m) => (
          <li key={m.id} className="rounded-md ring-1 ring-harbour-100">
            <div className="flex flex-wrap justify-between gap-2 border-b border-harbour-100 bg-harbour-50 px-4 py-2 text-sm">
              <span className="font-medium">{m.subject}</span>
              <span className="text-harbour-500">to {m.to.join(', ')} · {formatDateTime(m.receivedAt)}</span>
            </div>
            <pre className="whitespace-pre-wrap break-words px-4 py-3 font-sans text-sm text-harbour-800">{m.text}</pre>
          </li>
        ))}
      </ul>
    </Card>
  );
}
