import { useState } from 'react';
import { Badge, ErrorNote, Loading } from '../../../components/ui/primitives.tsx';
import { formatDateTime } from '../../../lib/format.ts';
import { useVersionDiff } from '../api/analyses.ts';
import type { AnalysisSummary, DiffEntry } from '../api/types.ts';

const show = (v: unknown) => (v === undefined ? '—' : typeof v === 'number' ? String(Number(v.toPrecision(8))) : JSON.stringify(v));

function DiffTable({ title, entries, limit }: { title: string; entries: DiffEntry[]; limit?: number }) {
  const rows = limit ? entries.slice(0, limit) : entries;
  return (
    <div>
      <h4 className="mb-1 text-xs font-semibold uppercase tracking-wide text-harbour-500">{title} ({entries.length})</h4>
      {entries.length === 0 ? <p className="text-sm text-harbour-500">No change.</p> : (
        <table className="w-full table-fixed text-xs">
          <tbody className="divide-y divide-harbour-100">
            {rows.map((d) => (
              <tr key={d.path + d.kind}>
                <td className="w-2/5 break-all py-1 pr-2 font-mono text-harbour-700">{d.path}</td>
                <td className="break-all py-1 pr-2 text-red-800">{show(d.from)}</td>
                <td className="break-all py-1 text-emerald-800">{show(d.to)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
      {limit && entries.length > limit && <p className="mt-1 text-xs text-harbour-500">…and {entries.length - limit} more changed values.</p>}
    </div>
  );
}

/** Every analysis version of the shot, the current one marked, and what changed between any two. */
export function VersionHistory({ shotId, analyses, currentId }: { shotId: string; analyses: AnalysisSummary[]; currentId: string | null }) {
  const done = analyses.filter((a) => a.state === 'done');
  const [a, setA] = useState<string | null>(null);
  const [b, setB] = useState<string | null>(null);
  const from = a ?? done[1]?.id ?? null;
  const to = b ?? done[0]?.id ?? null;
  const diff = useVersionDiff(shotId, from, to);
  if (analyses.length === 0) return <p className="text-sm text-harbour-500">No analysis yet.</p>;
  // Results changes that matter most come first.
  const ranked = (entries: DiffEntry[]) => [...entries].sort((x, y) => Number(!x.path.startsWith('speed')) - Number(!y.path.startsWith('speed')));
  return (
    <div className="space-y-4">
      <table className="w-full text-sm" data-testid="versions">
        <thead className="text-left text-xs uppercase tracking-wide text-harbour-500">
          <tr><th className="py-1 font-medium">Version</th><th className="py-1 font-medium">State</th><th className="py-1 font-medium">Asked by</th><th className="py-1 text-center font-medium">from</th><th className="py-1 text-center font-medium">to</th></tr>
        </thead>
        <tbody className="divide-y divide-harbour-100">
          {analyses.map((v) => (
            <tr key={v.id}>
              <td className="py-1.5 font-medium">v{v.version} {v.id === currentId && <Badge tone="good">current</Badge>}</td>
              <td className="py-1.5">
                {v.state === 'done' ? 'done' : v.state === 'failed' ? <span className="text-red-800" title={v.error ?? ''}>failed</span> : `${v.state} ${v.progress} %`}
              </td>
              <td className="py-1.5 text-harbour-600">{v.requestedBy ? v.requestedByName ?? 'a former member' : 'automatic, when the files were read'} · {formatDateTime(v.createdAt)}</td>
              <td className="py-1.5 text-center"><input type="radio" name="diff-from" aria-label={`Compare from v${v.version}`} disabled={v.state !== 'done'} checked={from === v.id} onChange={() => setA(v.id)} /></td>
              <td className="py-1.5 text-center"><input type="radio" name="diff-to" aria-label={`Compare to v${v.version}`} disabled={v.state !== 'done'} checked={to === v.id} onChange={() => setB(v.id)} /></td>
            </tr>
          ))}
        </tbody>
      </table>
      {analyses.some((v) => v.state === 'failed') && (
        <ErrorNote error={new Error(analyses.find((v) => v.state === 'failed')!.error ?? 'An analysis failed.')} />
      )}
      {from && to && from !== to && (
        <div className="space-y-3 rounded-md bg-harbour-50 p-3" data-testid="version-diff">
          {diff.isPending && <Loading what="Comparing" />}
          {diff.isError && <ErrorNote error={diff.error} />}
          {diff.data && (
            <>
              <p className="text-sm font-medium">v{diff.data.from.version} → v{diff.data.to.version}{diff.data.engineChanged && ' (engine version changed)'}</p>
              <DiffTable title="Parameters" entries={diff.data.parameters} />
              <DiffTable title="Results" entries={ranked(diff.data.results)} limit={12} />
            </>
          )}
        </div>
      )}
    </div>
  );
}
