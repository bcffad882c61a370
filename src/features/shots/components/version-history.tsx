import { useState } from 'react';
import { Badge, ErrorNote, Loading } from '../../../components/ui/primitives.tsx';
import { budgetChanges, labelParameter, labelResult, raw, type LabelGroup } from '../../../../shared/contracts/analysis-labels.ts';
import { formatDateTime, formatMeasurement } from '../../../lib/format.ts';
import { useVersionDiff } from '../api/analyses.ts';
import type { AnalysisSummary, DiffEntry, VersionDiff } from '../api/types.ts';

interface DiffRow { key: string; group: LabelGroup; label: string; path: string; from: string; to: string; rawFrom: string; rawTo: string }

const GROUP_ORDER: LabelGroup[] = ['Result', 'Settings', 'Gates', 'Budget'];
const GROUP_TITLE: Record<LabelGroup, string> = { Result: 'Result', Settings: 'Analysis settings', Gates: 'Gates and crossings', Budget: 'Uncertainty budget' };

/** Diff entries in the lab's words, each with its raw path and values kept for "show raw values". */
function rowsOf(entries: DiffEntry[], label: (path: string) => { group: LabelGroup; label: string; format: (v: unknown) => string }): DiffRow[] {
  return entries.map((d) => {
    const l = label(d.path);
    return { key: `${d.path}:${d.kind}`, group: l.group, label: l.label, path: d.path, from: d.from === undefined ? '—' : l.format(d.from), to: d.to === undefined ? '—' : l.format(d.to), rawFrom: raw(d.from), rawTo: raw(d.to) };
  });
}

/**
 * Rows whose change shows in the digits displayed, and rows whose value changed only beyond them (133.2561 → 133.2563
 * read "133.256 m/s → 133.256 m/s"): those are listed only with the raw values, which show every digit.
 */
export function splitShownChanges<R extends { from: string; to: string }>(rows: R[]): { shown: R[]; beyondDigits: R[] } {
  return { shown: rows.filter((r) => r.from !== r.to), beyondDigits: rows.filter((r) => r.from === r.to) };
}

/** One group of changed values; long groups open on request, so every changed row can be seen. */
function DiffGroup({ group, rows, showRaw }: { group: LabelGroup; rows: DiffRow[]; showRaw: boolean }) {
  const table = (
    <table className="w-full table-fixed text-xs">
      <tbody className="divide-y divide-harbour-100">
        {rows.map((r) => (
          <tr key={r.key}>
            <td className="w-2/5 py-1 pr-2 text-harbour-800">{r.label}{showRaw && <span className="block break-all font-mono text-[11px] text-harbour-500">{r.path}</span>}</td>
            <td className="break-words py-1 pr-2 text-red-800">{showRaw ? r.rawFrom : r.from}</td>
            <td className="w-4 py-1 text-harbour-400" aria-hidden>→</td>
            <td className="break-words py-1 text-emerald-800">{showRaw ? r.rawTo : r.to}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
  const title = `${GROUP_TITLE[group]} (${rows.length} changed)`;
  if (rows.length <= 12) {
    return <div><h4 className="mb-1 text-xs font-semibold text-harbour-600">{title}</h4>{table}</div>;
  }
  return (
    <details>
      <summary className="cursor-pointer text-xs font-semibold text-harbour-600">{title}: show them all</summary>
      <div className="mt-1">{table}</div>
    </details>
  );
}

/** What changed from one version to another: the speed first, then settings, gates and budget, in words and units. */
function VersionDiffView({ diff }: { diff: VersionDiff }) {
  const [showRaw, setShowRaw] = useState(false);
  // Every parameter (the gate map included) is a setting; "Gates and crossings" holds what the engine found.
  const params = rowsOf(diff.parameters, (p) => ({ ...labelParameter(p, { thresholdUnit: diff.thresholdUnit?.to }), group: 'Settings' as const }));
  // Speed value and U are the headline; the remaining result rows are listed by group.
  const results = rowsOf(diff.results, labelResult).filter((r) => r.path !== 'speed.value' && r.path !== 'speed.uncertainty');
  // Budget lines are named by their source ("Time-base accuracy"), matched by source across the versions; servers
  // before issue 11 send no budget, and their rows keep the path-based labels.
  const budget: DiffRow[] = diff.budget
    ? budgetChanges(diff.budget.from, diff.budget.to).map((b) => ({ key: `budget:${b.label}`, group: 'Budget', label: b.label, path: 'speed.budget', from: b.from, to: b.to, rawFrom: b.from, rawTo: b.to }))
    : [];
  const every = [...params, ...(diff.budget ? results.filter((r) => !r.path.startsWith('speed.budget')) : results), ...budget];
  const { shown, beyondDigits } = splitShownChanges(every);
  const all = showRaw ? every : shown;
  const s = diff.speed;
  const change = s?.from && s.to ? ((s.to.value - s.from.value) / s.from.value) * 100 : null;
  return (
    <div className="space-y-3">
      <p className="text-sm font-medium">
        v{diff.from.version} → v{diff.to.version}{diff.engineChanged && ' (engine version changed)'}
      </p>
      {s && (s.from || s.to) && (
        <p className="text-sm" data-testid="diff-speed">
          Speed: {s.from ? formatMeasurement(s.from.value, s.from.uncertainty, 'm/s') : 'none'} → {s.to ? formatMeasurement(s.to.value, s.to.uncertainty, 'm/s') : 'none'}
          {change != null && ` (${change >= 0 ? '+' : '−'}${Math.abs(change).toFixed(Math.abs(change) < 0.1 ? 2 : 1)} %)`}
        </p>
      )}
      {every.length === 0 && <p className="text-sm text-harbour-500">No other change.</p>}
      {GROUP_ORDER.map((g) => {
        const rows = all.filter((r) => r.group === g);
        return rows.length > 0 && <DiffGroup key={g} group={g} rows={rows} showRaw={showRaw} />;
      })}
      {!showRaw && beyondDigits.length > 0 && (
        <p className="text-xs text-harbour-500" data-testid="diff-beyond-digits">
          {beyondDigits.length} more {beyondDigits.length === 1 ? 'value changed' : 'values changed'} only beyond the digits shown; tick “Show raw stored values” to see {beyondDigits.length === 1 ? 'it' : 'them'}.
        </p>
      )}
      {every.length > 0 && (
        <label className="flex items-center gap-2 text-xs text-harbour-600">
          <input type="checkbox" checked={showRaw} onChange={(e) => setShowRaw(e.target.checked)} className="h-3.5 w-3.5 accent-harbour-700" />
          Show raw stored values and their paths
        </label>
      )}
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
          {diff.data && <VersionDiffView diff={diff.data} />}
        </div>
      )}
    </div>
  );
}
