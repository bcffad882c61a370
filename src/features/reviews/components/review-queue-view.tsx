import { useState } from 'react';
import { Link, useNavigate } from 'react-router-dom';
import { Button, EmptyState, ErrorNote, Loading } from '../../../components/ui/primitives.tsx';
import { formatDateTime, formatMeasurement } from '../../../lib/format.ts';
import { useReviewQueue } from '../api/review-queue.ts';

const METHOD: Record<string, string> = { flight: 'time of flight', occlusion: 'occlusion' };
/** Comparison shows two to four shots. */
const MAX_COMPARE = 4;

/** Shots waiting for review, oldest request first, with a picker that opens two to four of them side by side. */
export function ReviewQueueView({ labId }: { labId: string }) {
  const q = useReviewQueue(labId);
  const navigate = useNavigate();
  const [picked, setPicked] = useState<string[]>([]);
  if (q.isPending) return <Loading what="Loading the review queue" />;
  if (q.isError) return <ErrorNote error={q.error} />;
  const rows = q.data;
  if (rows.length === 0) return <EmptyState title="Nothing waiting for review">Shots appear here when an experimenter or analyst sends them for review.</EmptyState>;
  const toggle = (id: string) => setPicked((p) => (p.includes(id) ? p.filter((x) => x !== id) : p.length < MAX_COMPARE ? [...p, id] : p));

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-3 text-sm">
        <Button variant="secondary" disabled={picked.length < 2} onClick={() => navigate(`/labs/${labId}/compare?shots=${picked.join(',')}`)}>
          Compare {picked.length >= 2 ? `${picked.length} shots` : 'shots'}
        </Button>
        <span className="text-harbour-500">{picked.length < 2 ? 'Tick two to four shots to see them side by side.' : `${picked.length} of at most ${MAX_COMPARE} ticked.`}</span>
      </div>
      <div className="overflow-x-auto rounded-lg bg-white shadow-sm ring-1 ring-harbour-100">
        <table className="min-w-full text-sm">
          <thead className="bg-harbour-50 text-left text-xs font-semibold uppercase tracking-wide text-harbour-600">
            <tr>
              <th className="w-8 px-3 py-2"><span className="sr-only">Compare</span></th>
              <th className="px-3 py-2">Shot</th>
              <th className="hidden px-3 py-2 lg:table-cell">Campaign</th>
              <th className="px-3 py-2 text-right">Speed ± U</th>
              <th className="hidden px-3 py-2 lg:table-cell">Method</th>
              <th className="hidden px-3 py-2 lg:table-cell">Version</th>
              <th className="px-3 py-2">Sent by</th>
              <th className="hidden px-3 py-2 lg:table-cell">Sent</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-harbour-100">
            {rows.map((r) => (
              <tr key={r.shotId} className="align-top hover:bg-harbour-50/60">
                <td className="px-3 py-2">
                  <input
                    type="checkbox"
                    aria-label={`Compare shot ${r.number}`}
                    checked={picked.includes(r.shotId)}
                    disabled={!picked.includes(r.shotId) && picked.length >= MAX_COMPARE}
                    onChange={() => toggle(r.shotId)}
                    className="h-4 w-4 accent-harbour-700"
                  />
                </td>
                <td className="min-w-[9rem] px-3 py-2 font-medium">
                  <Link to={`/labs/${labId}/shots/${r.shotId}`} className="whitespace-nowrap text-harbour-800 hover:underline">Shot #{r.number}</Link>
                  {/* Below 1024 px the folded columns read as one line under the shot. */}
                  <p className="text-xs font-normal text-harbour-500 lg:hidden">
                    {[r.campaignName, r.analysisVersion != null ? `v${r.analysisVersion}` : null, r.speed?.method ? METHOD[r.speed.method] ?? r.speed.method : null, formatDateTime(r.requestedAt)].filter(Boolean).join(' · ')}
                  </p>
                </td>
                <td className="hidden px-3 py-2 text-harbour-700 lg:table-cell">{r.campaignName ?? '—'}</td>
                <td className={`whitespace-nowrap px-3 py-2 text-right tabular-nums ${r.timeBaseCheck?.blocksApproval ? 'text-harbour-300' : ''}`}>
                  {formatMeasurement(r.speed?.value, r.speed?.uncertainty, 'm/s')}
                  {r.timeBaseCheck?.blocksApproval && <p className="text-xs font-medium text-signal-800" data-testid="queue-time-base">check the time base</p>}
                </td>
                <td className="hidden whitespace-nowrap px-3 py-2 text-harbour-700 lg:table-cell">{r.speed?.method ? METHOD[r.speed.method] ?? r.speed.method : '—'}</td>
                <td className="hidden px-3 py-2 text-harbour-700 lg:table-cell">{r.analysisVersion != null ? `v${r.analysisVersion}` : '—'}</td>
                <td className="min-w-[11rem] px-3 py-2 text-harbour-700">
                  {r.requestedBy?.name ?? '—'}
                  {r.message && <p className="max-w-xs whitespace-pre-wrap text-xs text-harbour-500">“{r.message}”</p>}
                </td>
                <td className="hidden whitespace-nowrap px-3 py-2 text-harbour-600 lg:table-cell">{formatDateTime(r.requestedAt)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
