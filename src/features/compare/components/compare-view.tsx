import { shotStatus } from '../../../lib/shot-status.ts';
import { useCallback, useMemo, useRef, useState } from 'react';
import { Link } from 'react-router-dom';
import type { ShotAnalysis } from '../../../../shared/analysis/types.ts';
import { Button, Card } from '../../../components/ui/primitives.tsx';
import { formatCelsius, formatDateTime, formatKpa, formatMeasurement, formatSeconds } from '../../../lib/format.ts';
import { captureExtent, plottedChannels } from '../../../lib/plotted-channels.ts';
import { clampToRecord, useRangeZoom, type Range } from '../../../lib/range-zoom.ts';
import type { ComparedShot, ShotNames } from '../api/types.ts';
import { alignmentOf, type AlignAt } from '../lib/alignment.ts';
import { parameterDifferences } from '../lib/parameter-differences.ts';
import { ComparePlot, type CompareSource } from './compare-plot.tsx';

/** One colour per compared shot, from the product's palette outward (deep harbour, amber, green, plum). */
export const SHOT_COLOURS = ['#16324a', '#c47a12', '#2f7d5b', '#8e3b72'];

const METHOD: Record<string, string> = { flight: 'time of flight', occlusion: 'occlusion' };
const BASIS: Record<string, string> = { fit: 'fit over all gates', pair: 'one pair of gates', occlusion: 'one gate’s occlusion' };

const resultsOf = (s: ComparedShot) => (s.currentAnalysis?.results ?? null) as ShotAnalysis | null;

/** The version's "check the time base" state in the words of the shot page; null when not flagged. */
export function timeBaseWords(s: ComparedShot): string | null {
  const check = s.currentAnalysis?.timeBaseCheck;
  if (!check?.flagged) return null;
  return check.blocksApproval ? 'check the time base: not a measurement until an analyst confirms the read' : 'time base checked by an analyst';
}

/** A range around every fired gate of every shot (relative to each shot's alignment), with a margin either side. */
function defaultRange(shots: ComparedShot[], offsets: number[]): Range {
  let from = Infinity;
  let to = -Infinity;
  shots.forEach((s, i) => {
    for (const g of resultsOf(s)?.gates ?? []) {
      for (const p of g.pulses) {
        from = Math.min(from, p.start - offsets[i]);
        to = Math.max(to, p.end - offsets[i]);
      }
    }
  });
  if (Number.isFinite(from) && to > from) {
    const margin = 0.25 * (to - from);
    return { from: from - margin, to: to + margin };
  }
  // Nothing fired anywhere: the first shot's whole record.
  const extent = shots.map((s) => captureExtent(s.captures)).find((e) => e != null);
  return extent ? { from: extent.from - offsets[0], to: extent.to - offsets[0] } : { from: -1e-3, to: 1e-3 };
}

/** Every shot's record on the relative axis (each shifted by its alignment instant), joined; null when none is read. */
function recordsSpan(shots: ComparedShot[], offsets: number[]): Range | null {
  let from = Infinity;
  let to = -Infinity;
  shots.forEach((s, i) => {
    const e = captureExtent(s.captures);
    if (!e) return;
    from = Math.min(from, e.from - offsets[i]);
    to = Math.max(to, e.to - offsets[i]);
  });
  return Number.isFinite(from) && to > from ? { from, to } : null;
}

function gateName(names: ShotNames[], position: number): string {
  for (const n of names) {
    const g = n.gateLabels.find((x) => Math.abs(x.position - position) < 1e-6);
    if (g) return `Gate ${g.label} · ${(position * 1000).toFixed(1)} mm`;
  }
  return `Gate at ${(position * 1000).toFixed(1)} mm`;
}

/**
 * Two to four shots side by side (a column of stacked traces per shot) and overlaid (one plot per gate position),
 * all on one time axis relative to each shot's alignment instant, with one shared zoom; results, conditions and
 * analysis parameters in tables beside them, differing parameters highlighted.
 */
export function CompareView({ labId, shots, names }: { labId: string; shots: ComparedShot[]; names: ShotNames[] }) {
  const [alignAt, setAlignAt] = useState<AlignAt>('first');
  const alignments = useMemo(() => shots.map((s) => alignmentOf(resultsOf(s), alignAt)), [shots, alignAt]);
  const offsets = alignments.map((a) => a.instant);
  const initial = useMemo(() => defaultRange(shots, alignments.map((a) => a.instant)), [shots, alignments]);
  const record = useMemo(() => recordsSpan(shots, alignments.map((a) => a.instant)), [shots, alignments]);
  const [zoom, setZoomState] = useState<Range | null>(null);
  const range = zoom ?? initial;
  // Zooms stay inside the shots' records; zooming out to all of them shows all of them (not the starting range).
  const setZoom = useCallback((r: Range) => setZoomState(record ? clampToRecord(r, record) ?? record : r), [record]);
  const reset = useCallback(() => setZoomState(null), []);
  const root = useRef<HTMLDivElement>(null);
  const { zoom: zoomBy, onKeyDown } = useRangeZoom({ box: root, current: range, setRange: setZoom, reset, record });
  const plotsLabel = 'Plots. Drag to zoom all of them; + and − zoom; arrow keys pan; 0 resets.';
  const plotsClass = 'rounded-md outline-none focus-visible:ring-2 focus-visible:ring-signal-400';

  const positions = useMemo(() => {
    const all = shots.flatMap((s) => (resultsOf(s)?.gates ?? []).map((g) => g.position));
    return [...new Set(all.map((p) => Math.round(p * 1e6) / 1e6))].sort((a, b) => a - b);
  }, [shots]);

  const channelsPerShot = useMemo(() => shots.map((s) => plottedChannels(s.captures)), [shots]);
  const label = (i: number) => `Shot #${shots[i].shot.number}`;
  const levelsOf = (i: number, channel: string) => resultsOf(shots[i])?.channels.find((c) => c.name === channel)?.levels ?? null;

  const overlays = positions.map((position) => {
    const sources: CompareSource[] = [];
    shots.forEach((s, i) => {
      const gate = resultsOf(s)?.gates.find((g) => Math.abs(g.position - position) < 1e-6);
      const ch = gate ? channelsPerShot[i].find((c) => c.name === gate.channel) : undefined;
      if (ch) sources.push({ key: `${s.shot.id}-${ch.captureId}-${ch.index}`, captureId: ch.captureId, channelIndex: ch.index, offset: offsets[i], colour: SHOT_COLOURS[i], label: label(i), levels: levelsOf(i, ch.name) });
    });
    return { position, sources };
  });

  const params = parameterDifferences(shots.map((s) => s.currentAnalysis?.parameters ?? null));
  const differing = params.filter((p) => p.differs).length;
  const [onlyDiffering, setOnlyDiffering] = useState(true);

  const anyFlagged = shots.some((s) => timeBaseWords(s) != null);
  const rows: { label: string; values: string[]; flags?: boolean[] }[] = [
    {
      label: 'Speed ± U (k = 2)',
      values: shots.map((s) => formatMeasurement(resultsOf(s)?.speed?.value, resultsOf(s)?.speed?.uncertainty, 'm/s')),
      flags: shots.map((s) => s.currentAnalysis?.timeBaseCheck?.blocksApproval === true),
    },
    ...(anyFlagged ? [{ label: 'Time base', values: shots.map((s) => timeBaseWords(s) ?? 'not flagged'), flags: shots.map((s) => s.currentAnalysis?.timeBaseCheck?.blocksApproval === true) }] : []),
    { label: 'Method', values: shots.map((s) => { const sp = resultsOf(s)?.speed; return sp ? `${METHOD[sp.method] ?? sp.method}, ${BASIS[sp.basis] ?? sp.basis}` : '—'; }) },
    { label: 'Mach', values: shots.map((s) => formatMeasurement(resultsOf(s)?.derived.mach?.value, resultsOf(s)?.derived.mach?.uncertainty)) },
    { label: 'Gates fired', values: shots.map((s) => { const g = resultsOf(s)?.gates ?? []; return g.length ? `${g.filter((x) => x.status === 'ok').length} of ${g.length}` : '—'; }) },
    { label: 'Aligned at', values: alignments.map((a) => (a.position == null ? 'no gate fired' : `${gateName(names, a.position)}${a.fallback ? ' (chosen gate missed)' : ''}`)) },
    { label: 'Version', values: shots.map((s) => (s.currentAnalysis ? `v${s.currentAnalysis.version} · engine ${s.currentAnalysis.engineVersion}` : '—')) },
    { label: 'Status', values: shots.map((s) => shotStatus(s.shot.status).label) },
    { label: 'Fired', values: shots.map((s) => formatDateTime(s.shot.firedAt)) },
    { label: 'Tube vacuum', values: shots.map((s) => formatKpa(s.shot.conditions.tubePressurePa)) },
    { label: 'Seal', values: shots.map((s) => s.shot.conditions.sealType || '—') },
    { label: 'Ambient', values: shots.map((s) => `${formatCelsius(s.shot.conditions.ambientTemperatureK)}, ${formatKpa(s.shot.conditions.ambientPressurePa, 4)}`) },
    { label: 'Projectile', values: names.map((n) => n.projectileName ?? '—') },
    { label: 'Gate rig', values: names.map((n) => n.rigName ?? '—') },
    { label: 'Campaign', values: names.map((n) => n.campaignName ?? '—') },
  ];

  const header = (
    <tr>
      <th className="px-2 py-1.5 text-left font-medium text-harbour-500" />
      {shots.map((s, i) => (
        <th key={s.shot.id} className="px-2 py-1.5 text-left font-semibold">
          <Link to={`/labs/${labId}/shots/${s.shot.id}`} className="inline-flex items-center gap-1.5 hover:underline">
            <span className="h-2.5 w-2.5 rounded-full" style={{ background: SHOT_COLOURS[i] }} aria-hidden />#{s.shot.number}
          </Link>
        </th>
      ))}
    </tr>
  );

  return (
    <div ref={root} className="space-y-4">
      <div className="flex flex-wrap items-end gap-3 rounded-lg bg-white px-4 py-3 shadow-sm ring-1 ring-harbour-100">
        <label className="text-sm">
          <span className="block font-medium text-harbour-800">Align at</span>
          <select
            aria-label="Align at"
            className="mt-1 rounded-md border-0 bg-white py-1.5 pl-2 pr-8 text-sm ring-1 ring-harbour-200 focus:ring-2 focus:ring-harbour-600"
            value={alignAt === 'first' ? 'first' : String(alignAt)}
            onChange={(e) => { setAlignAt(e.target.value === 'first' ? 'first' : Number(e.target.value)); reset(); }}
          >
            <option value="first">First gate’s crossing</option>
            {positions.map((p) => <option key={p} value={String(p)}>{gateName(names, p)}</option>)}
          </select>
        </label>
        <div className="flex gap-2">
          <Button variant="secondary" className="!px-2 !py-1 text-xs" onClick={() => zoomBy(0.5)}>Zoom in</Button>
          <Button variant="secondary" className="!px-2 !py-1 text-xs" onClick={() => zoomBy(2)}>Zoom out</Button>
          <Button variant="secondary" className="!px-2 !py-1 text-xs" onClick={reset} disabled={!zoom}>Reset</Button>
        </div>
        <div className="space-y-0.5 text-xs text-harbour-600">
          <p data-testid="compare-range">
            Showing {formatSeconds(range.from, 4)} to {formatSeconds(range.to, 4)} from the alignment instant (dashed line).
          </p>
          <p>Drag across any plot to zoom all of them; wheel zooms; with the plots focused, ← → pan and 0 resets.</p>
        </div>
      </div>

      {/* Tables beside the plots only where four shots' columns fit (2xl); below them otherwise, full width. */}
      <div className="grid gap-4 2xl:grid-cols-[minmax(0,1fr)_34rem]">
        <div className="min-w-0 space-y-4">
          <Card title="Overlaid, one plot per gate">
            <div className="mb-2 flex flex-wrap gap-3 text-xs" aria-label="Legend">
              {shots.map((s, i) => (
                <span key={s.shot.id} className="inline-flex items-center gap-1.5">
                  <span className="h-0.5 w-5" style={{ background: SHOT_COLOURS[i] }} aria-hidden />Shot #{s.shot.number}
                </span>
              ))}
            </div>
            {overlays.length === 0 && <p className="text-sm text-harbour-500">No gate positions: none of these shots has a finished analysis.</p>}
            <div className={`space-y-2 ${plotsClass}`} tabIndex={overlays.length > 0 ? 0 : undefined} aria-label={plotsLabel} onKeyDown={onKeyDown}>
              {overlays.map((o) => <ComparePlot key={o.position} title={gateName(names, o.position)} sources={o.sources} range={range} onRange={setZoom} />)}
            </div>
          </Card>

        </div>

        <div className="space-y-4">
          <Card title="Results and conditions">
            <div className="overflow-x-auto">
              <table className="w-full text-xs">
                <thead>{header}</thead>
                <tbody className="divide-y divide-harbour-100">
                  {rows.map((r) => (
                    <tr key={r.label}>
                      <th scope="row" className="px-2 py-1.5 text-left font-medium text-harbour-600">{r.label}</th>
                      {r.values.map((v, i) => (
                        <td
                          key={i}
                          className={`px-2 py-1.5 tabular-nums ${r.flags?.[i] ? (r.label === 'Time base' ? 'font-medium text-signal-800' : 'text-harbour-300') : 'text-harbour-800'}`}
                          data-testid={r.label === 'Time base' ? 'compare-time-base' : undefined}
                          data-unchecked={r.flags?.[i] || undefined}
                        >
                          {v}
                        </td>
                      ))}
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          </Card>
          <Card
            title={`Analysis parameters · ${differing === 0 ? 'all the same' : `${differing} differ`}`}
            actions={
              <label className="flex items-center gap-1.5 text-xs text-harbour-600">
                <input type="checkbox" className="h-3.5 w-3.5 accent-harbour-700" checked={onlyDiffering} onChange={(e) => setOnlyDiffering(e.target.checked)} />
                only differences
              </label>
            }
          >
            <div className="overflow-x-auto">
              <table className="w-full text-xs" aria-label="Analysis parameters">
                <thead>{header}</thead>
                <tbody className="divide-y divide-harbour-100">
                  {params.filter((p) => !onlyDiffering || p.differs).map((p) => (
                    <tr key={p.path} data-differs={p.differs ? 'true' : 'false'}>
                      <th scope="row" className="px-2 py-1 text-left font-normal text-harbour-700" title={p.path}>{p.label}</th>
                      {p.shown.map((v, i) => (
                        <td key={i} className={`break-words px-2 py-1 tabular-nums ${p.differs ? 'bg-signal-100 font-semibold text-signal-800' : 'text-harbour-700'}`}>{v}</td>
                      ))}
                    </tr>
                  ))}
                  {onlyDiffering && differing === 0 && (
                    <tr><td colSpan={shots.length + 1} className="px-2 py-2 text-harbour-500">Every parameter is the same.</td></tr>
                  )}
                </tbody>
              </table>
            </div>
          </Card>
        </div>
      </div>
      <Card title="Side by side">
        <div tabIndex={0} aria-label={plotsLabel} onKeyDown={onKeyDown} className={`grid gap-3 sm:grid-cols-2 ${plotsClass} ${shots.length === 3 ? 'lg:grid-cols-3' : shots.length === 4 ? 'lg:grid-cols-4' : ''}`}>
          {shots.map((s, i) => (
            <div key={s.shot.id} className="min-w-0 space-y-1" data-testid="compare-column">
              <p className="flex items-center gap-1.5 text-sm font-semibold"><span className="h-2.5 w-2.5 rounded-full" style={{ background: SHOT_COLOURS[i] }} aria-hidden />Shot #{s.shot.number}</p>
              {channelsPerShot[i].length === 0 && <p className="text-xs text-harbour-500">No traces read yet.</p>}
              {channelsPerShot[i].map((ch) => (
                <ComparePlot
                  key={`${ch.captureId}-${ch.index}`}
                  title={ch.name}
                  height={140}
                  sources={[{ key: `${ch.captureId}-${ch.index}`, captureId: ch.captureId, channelIndex: ch.index, offset: offsets[i], colour: SHOT_COLOURS[i], label: label(i), levels: levelsOf(i, ch.name) }]}
                  range={range}
                  onRange={setZoom}
                />
              ))}
            </div>
          ))}
        </div>
      </Card>
    </div>
  );
}
