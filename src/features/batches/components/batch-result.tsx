import { Link } from 'react-router-dom';
import { Badge, Card, ErrorNote, Loading, PageHeader } from '../../../components/ui/primitives.tsx';
import { formatDateTime, formatMeasurement } from '../../../lib/format.ts';
import { useBatch, type BatchShotRow, type Outcome } from '../api/batches.ts';
import { describeSettings } from '../lib/settings-form.ts';

const METHOD = { fit: 'flight, fit', pair: 'flight, two gates', occlusion: 'occlusion' } as Record<string, string>;
const methodOf = (o: Outcome | null) => (o?.speed ? METHOD[o.speed.basis] ?? o.speed.method : 'no speed');
const speedText = (o: Outcome | null) => (o?.speed ? formatMeasurement(o.speed.value, o.speed.uncertainty, 'm/s') : '—');

/** "+0.42", "−1.30", and "0.00" for a change that rounds to nothing (no sign it does not have). */
function signed(x: number): string {
  const text = Math.abs(x).toFixed(2);
  return Number(text) === 0 ? text : `${x > 0 ? '+' : '−'}${text}`;
}

function ChangeCell({ row }: { row: BatchShotRow }) {
  if (row.after.state === 'failed') return <span className="text-red-700">failed: {row.after.error}</span>;
  if (row.after.state !== 'done') return <span className="text-harbour-400">{row.after.state === 'running' ? 'computing…' : 'queued'}</span>;
  const c = row.change;
  if (!c || c.delta == null) return <span className="text-harbour-400">—</span>;
  const big = c.deltaInU != null && Math.abs(c.deltaInU) > 1;
  return (
    <span className={big ? 'font-semibold text-signal-800' : ''}>
      {signed(c.delta)} m/s
      {c.deltaInU != null && <span className="block text-xs">{signed(c.deltaInU)} U</span>}
    </span>
  );
}

/** One batch: its progress while it runs, then each shot's speed before and after, in units of U, and what changed. */
export function BatchResult({ labId, batchId }: { labId: string; batchId: string }) {
  const q = useBatch(labId, batchId);
  if (q.isPending) return <Loading what="Loading the batch" />;
  if (q.isError) return <ErrorNote error={q.error} />;
  const { batch, shots } = q.data;
  const finished = batch.counts.done + batch.counts.failed;
  const pct = batch.counts.total === 0 ? 100 : Math.round((finished / batch.counts.total) * 100);
  return (
    <>
      <PageHeader
        title="Batch recompute"
        subtitle={`${formatDateTime(batch.createdAt)} · ${batch.requestedByName ?? 'someone no longer in the lab'} · ${describeSettings(batch.settings)}`}
        actions={<Link to={`/labs/${labId}/campaigns/${batch.campaignId}/batch`} className="text-sm font-medium text-harbour-600 hover:underline">Batches of this campaign</Link>}
      />
      <div className="space-y-6">
        <Card title="Progress">
          <div className="space-y-2">
            <div className="h-3 overflow-hidden rounded-full bg-harbour-100" role="progressbar" aria-valuemin={0} aria-valuemax={100} aria-valuenow={pct} aria-label="Batch progress">
              <div className={`h-full ${batch.counts.failed ? 'bg-signal-400' : 'bg-harbour-600'}`} style={{ width: `${pct}%` }} />
            </div>
            <p className="text-sm text-harbour-700" role="status" data-testid="batch-progress">
              {batch.state === 'done' ? 'Finished' : 'Working'}: {finished} of {batch.counts.total} shot{batch.counts.total === 1 ? '' : 's'} done
              {batch.counts.failed > 0 && `, ${batch.counts.failed} failed`}
              {batch.state === 'running' && ` (${batch.counts.running} computing, ${batch.counts.queued} waiting)`}.
            </p>
            {batch.skipped.length > 0 && (
              <p className="text-sm text-harbour-600">Left out: {batch.skipped.map((s) => `#${s.number} (${s.reason})`).join('; ')}.</p>
            )}
          </div>
        </Card>
        <Card title="Before and after">
          <div className="-mx-5 -mt-5 overflow-x-auto">
            <table className="min-w-full text-sm" aria-label="Before and after">
              <thead className="text-left text-xs uppercase tracking-wide text-harbour-500">
                <tr>
                  <th scope="col" className="py-2 pr-3 pl-5 font-medium">Shot</th>
                  <th scope="col" className="px-3 py-2 text-right font-medium">Before</th>
                  <th scope="col" className="px-3 py-2 text-right font-medium">After</th>
                  <th scope="col" className="px-3 py-2 text-right font-medium" title="after − before, and the same in units of the earlier version's U (k = 2)">Change</th>
                  <th scope="col" className="px-3 py-2 pr-5 font-medium">Method and gates</th>
                </tr>
              </thead>
              <tbody className="divide-y divide-harbour-100">
                {shots.map((row) => (
                  <tr key={row.shotId} className="align-top" data-testid="batch-row">
                    <td className="py-2 pr-3 pl-5 font-medium tabular-nums">
                      <Link to={`/labs/${labId}/shots/${row.shotId}`} className="text-harbour-800 hover:underline">#{row.number}</Link>
                    </td>
                    <td className="px-3 py-2 text-right tabular-nums whitespace-nowrap text-harbour-700">
                      {speedText(row.before)}
                      {row.before && <span className="block text-xs text-harbour-500">v{row.before.version}</span>}
                    </td>
                    <td className="px-3 py-2 text-right tabular-nums whitespace-nowrap text-harbour-900">
                      {row.after.state === 'done' ? speedText(row.after) : '…'}
                      <span className="block text-xs text-harbour-500">v{row.after.version}</span>
                    </td>
                    <td className="px-3 py-2 text-right tabular-nums whitespace-nowrap"><ChangeCell row={row} /></td>
                    <td className="px-3 py-2 pr-5">
                      {row.change?.methodChanged ? (
                        <Badge tone="signal">{methodOf(row.before)} → {methodOf(row.after)}</Badge>
                      ) : <span className="text-harbour-600">{row.after.state === 'done' ? methodOf(row.after) : ''}</span>}
                      {row.change?.gatesGained.map((g) => <span key={g} className="mt-1 block text-xs text-emerald-800">gained {g}</span>)}
                      {row.change?.gatesLost.map((g) => <span key={g} className="mt-1 block text-xs text-red-800">lost {g}</span>)}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <p className="-mx-5 -mb-5 border-t border-harbour-100 px-5 py-3 text-xs text-harbour-500">
            Change in units of U: (after − before) divided by the earlier version’s expanded uncertainty (k = 2). Both versions
            come from the same samples, so their errors are strongly correlated: a change above 1 U means the settings, not the
            noise, moved the result. Every new version needs its own review before it is signed off.
          </p>
        </Card>
      </div>
    </>
  );
}
