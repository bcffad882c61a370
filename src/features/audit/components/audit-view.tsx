import { useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import { Card, EmptyState, ErrorNote, Loading, SelectField } from '../../../components/ui/primitives.tsx';
import { AUDIT_KINDS, auditSentence } from '../../../lib/audit-sentence.ts';
import { formatDateTime } from '../../../lib/format.ts';
import { useAudit, type AuditRow } from '../api/audit.ts';

/** One event as a sentence, the shot as a link, and the stored record (ids, raw values) on request. */
function AuditEntry({ labId, e }: { labId: string; e: AuditRow }) {
  const s = auditSentence(e);
  return (
    <li className="grid gap-1 py-2 sm:grid-cols-[11rem_1fr]">
      <span className="tabular-nums text-harbour-500">{formatDateTime(e.at)}</span>
      <div>
        <p>
          <span className="font-medium">{s.who}</span> {s.verb}{' '}
          {s.shot && (e.shot ? <Link to={`/labs/${labId}/shots/${e.shot.id}`} className="font-medium text-harbour-800 underline-offset-2 hover:underline">{s.shot}</Link> : s.shot)}
          {s.rest}
        </p>
        <details className="text-xs text-harbour-500">
          <summary className="cursor-pointer">Details</summary>
          <pre className="mt-1 overflow-x-auto whitespace-pre-wrap break-all rounded bg-harbour-50 p-2 font-mono">
            {JSON.stringify({ action: e.action, target: e.targetType ? `${e.targetType} ${e.targetId}` : null, actorId: e.actorId, ...e.details }, null, 2)}
          </pre>
        </details>
      </div>
    </li>
  );
}

export function AuditView({ labId }: { labId: string }) {
  const audit = useAudit(labId);
  const [shot, setShot] = useState('');
  const [person, setPerson] = useState('');
  const [kind, setKind] = useState('');
  const events = useMemo(() => audit.data?.events ?? [], [audit.data]);
  const shots = useMemo(() => {
    const seen = new Map<string, NonNullable<AuditRow['shot']>>();
    for (const e of events) if (e.shot) seen.set(e.shot.id, e.shot);
    return [...seen.values()].sort((a, b) => (a.campaignName ?? '').localeCompare(b.campaignName ?? '') || a.number - b.number);
  }, [events]);
  const people = useMemo(() => [...new Map(events.filter((e) => e.actorId).map((e) => [e.actorId!, e.actor ?? 'a former member'])).entries()].sort((a, b) => a[1].localeCompare(b[1])), [events]);
  const shown = events.filter((e) => (!shot || e.shot?.id === shot) && (!person || e.actorId === person) && (!kind || e.action.startsWith(`${kind}.`)));
  return (
    <Card title="Events">
      <p className="mb-4 text-sm text-harbour-500">Every change in this lab, newest first (the latest {events.length || 500}). Entries can be added, never edited or removed.</p>
      <div className="mb-4 grid gap-3 sm:grid-cols-3" role="search" aria-label="Filter the audit trail">
        <SelectField label="Shot" value={shot} onChange={(e) => setShot(e.target.value)}>
          <option value="">Every shot</option>
          {shots.map((s) => <option key={s.id} value={s.id}>#{s.number} · {s.campaignName}</option>)}
        </SelectField>
        <SelectField label="Person" value={person} onChange={(e) => setPerson(e.target.value)}>
          <option value="">Everyone</option>
          {people.map(([id, name]) => <option key={id} value={id}>{name}</option>)}
        </SelectField>
        <SelectField label="Kind of event" value={kind} onChange={(e) => setKind(e.target.value)}>
          <option value="">Every kind</option>
          {Object.entries(AUDIT_KINDS).map(([k, label]) => <option key={k} value={k}>{label}</option>)}
        </SelectField>
      </div>
      {audit.isPending && <Loading />}
      {audit.isError && <ErrorNote error={audit.error} />}
      {audit.data && events.length === 0 && <EmptyState title="Nothing recorded yet" />}
      {audit.data && events.length > 0 && shown.length === 0 && <EmptyState title="No event matches these filters" />}
      {shown.length > 0 && (
        <ol className="divide-y divide-harbour-100 text-sm" aria-label="Audit trail">
          {shown.map((e) => <AuditEntry key={e.id} labId={labId} e={e} />)}
        </ol>
      )}
    </Card>
  );
}
