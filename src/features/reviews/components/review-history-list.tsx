import { formatDateTime } from '../../../lib/format.ts';
import type { HistoryEntry } from '../api/types.ts';

const who = (e: HistoryEntry) => e.by?.name ?? 'a former member';

/** Requests and decisions, oldest first, each with the version it was about. */
export function ReviewHistoryList({ history }: { history: HistoryEntry[] }) {
  if (history.length === 0) return <p className="text-xs text-harbour-500">Not sent for review yet.</p>;
  return (
    <ol className="space-y-2" aria-label="Review history">
      {history.map((e) => {
        const version = e.analysisVersion != null ? `v${e.analysisVersion}` : 'a version';
        const text = e.type === 'request'
          ? `${who(e)} sent ${version} for review`
          : e.decision === 'approved' ? `${who(e)} signed off ${version}` : `${who(e)} returned ${version}`;
        const note = e.type === 'request' ? e.message : e.comment;
        const dot = e.type === 'request' ? 'bg-signal-400' : e.decision === 'approved' ? 'bg-emerald-600' : 'bg-red-600';
        return (
          <li key={`${e.type}-${e.id}`} className="flex gap-2 text-xs">
            <span className={`mt-1 h-2 w-2 shrink-0 rounded-full ${dot}`} aria-hidden />
            <div>
              <p className="text-harbour-800"><span className="font-medium">{text}</span> · <span className="text-harbour-500">{formatDateTime(e.at)}</span></p>
              {note && <p className="mt-0.5 whitespace-pre-wrap text-harbour-600">“{note}”</p>}
            </div>
          </li>
        );
      })}
    </ol>
  );
}
