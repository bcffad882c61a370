import { useState } from 'react';
import { ErrorNote, Loading } from '../../../components/ui/primitives.tsx';
import { auditSentence } from '../../../lib/audit-sentence.ts';
import { formatDateTime } from '../../../lib/format.ts';
import { useShotAudit } from '../api/shot-audit.ts';

const sentence = (e: { action: string; actor: string | null; details: Record<string, unknown> | null }) => {
  const s = auditSentence({ ...e, details: e.details ?? {} }, { thisShot: true });
  return `${s.who} ${s.verb}${s.shot ? ` ${s.shot}` : ''}${s.rest}`;
};

/** The shot's audit trail, loaded when opened (append-only on the server; shown to admins and reviewers). */
export function ShotAuditList({ shotId, status }: { shotId: string; status: string }) {
  const [open, setOpen] = useState(false);
  const q = useShotAudit(shotId, status, open);
  return (
    <details className="text-xs" onToggle={(e) => setOpen((e.target as HTMLDetailsElement).open)}>
      <summary className="cursor-pointer font-medium text-harbour-700">Audit trail of this shot</summary>
      <div className="mt-2">
        {q.isPending && open && <Loading what="Loading the audit trail" />}
        {q.isError && <ErrorNote error={q.error} />}
        {q.data && q.data.length === 0 && <p className="text-harbour-500">Nothing recorded yet.</p>}
        {q.data && q.data.length > 0 && (
          <ol className="max-h-48 space-y-1 overflow-y-auto" aria-label="Audit trail of this shot">
            {q.data.map((e) => (
              <li key={e.id} className="flex gap-2">
                <span className="shrink-0 text-harbour-500">{formatDateTime(e.at)}</span>
                <span>{sentence(e)}</span>
              </li>
            ))}
          </ol>
        )}
      </div>
    </details>
  );
}
