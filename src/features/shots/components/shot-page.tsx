import { useCallback, useMemo, useState, type ReactNode } from 'react';
import { Link } from 'react-router-dom';
import type { ShotAnalysis } from '../../../../shared/analysis/types.ts';
import type { AnalysisOptionsInput } from '../../../../shared/contracts/analysis.ts';
import { Badge, Button, Card, ErrorNote, Loading } from '../../../components/ui/primitives.tsx';
import { formatCelsius, formatDateTime, formatKpa } from '../../../lib/format.ts';
import { shotStatus } from '../../../lib/shot-status.ts';
import { usePreview } from '../api/preview.ts';
import { isBusy, useShot } from '../api/shot.ts';
import { useDeleteShot, useRestoreShot } from '../api/shot-corrections.ts';
import { AnalystPanel } from './analyst-panel.tsx';
import { CaptureDrop } from './capture-drop.tsx';
import { CaptureList } from './capture-list.tsx';
import { PositionTimePlot } from './position-time-plot.tsx';
import { ResultPanel } from './result-panel.tsx';
import { ConfirmTimeBase } from './time-base-check.tsx';
import { plottedChannels, TraceStack } from './trace-stack.tsx';
import { UncertaintyBudget } from './uncertainty-budget.tsx';
import { VersionHistory } from './version-history.tsx';


export interface ShotPageProps {
  shotId: string;
  campaignName: string | null;
  campaignPath: string;
  projectileName: string | null;
  rigName: string | null;
  /** Rig label of the gate at a position ("A"); the page falls back to the position order. */
  rigLabels: { position: number; label: string }[];
  labId: string;
  canUpload: boolean;
  canRecompute: boolean;
  /** Lab admins may restore a deleted shot. */
  canRestore: boolean;
  /** The conditions form (from the campaigns feature), shown when "Correct conditions" is pressed. */
  conditionsEditor?: (close: () => void) => ReactNode;
  aside?: ReactNode;
}

/** Delete a shot logged by mistake (asks first), or restore a deleted one (lab admins). */
function DeleteOrRestore({ labId, shotId, number, deleted, canDelete, canRestore }: { labId: string; shotId: string; number: number; deleted: boolean; canDelete: boolean; canRestore: boolean }) {
  const del = useDeleteShot(labId, shotId);
  const restore = useRestoreShot(labId, shotId);
  const [asking, setAsking] = useState(false);
  if (deleted) {
    return (
      <div className="flex flex-wrap items-center gap-3 rounded-md bg-red-50 px-4 py-3 text-sm text-red-900 ring-1 ring-red-200" role="status" data-testid="shot-deleted">
        <span>Shot #{number} is deleted: it is left out of the campaign table, the trends and the exports.{!canRestore && ' A lab admin can restore it.'}</span>
        {canRestore && <Button variant="secondary" disabled={restore.isPending} onClick={() => restore.mutate()}>{restore.isPending ? 'Restoring…' : 'Restore shot'}</Button>}
        {restore.isError && <ErrorNote error={restore.error} />}
      </div>
    );
  }
  if (!canDelete) return null;
  if (!asking) return <Button variant="ghost" className="text-xs" onClick={() => setAsking(true)}>Delete shot…</Button>;
  return (
    <div className="flex flex-wrap items-center gap-2 rounded-md bg-red-50 px-3 py-2 text-xs text-red-900 ring-1 ring-red-200" role="group" aria-label="Delete shot">
      Delete shot #{number}, logged by mistake? It stays on record and a lab admin can restore it.
      <Button variant="secondary" className="!py-1 text-xs" disabled={del.isPending} onClick={() => del.mutate(undefined, { onSuccess: () => setAsking(false) })}>Delete shot</Button>
      <Button variant="ghost" className="!py-1 text-xs" onClick={() => setAsking(false)}>Keep</Button>
      {del.isError && <ErrorNote error={del.error} />}
    </div>
  );
}

export function ShotPage(props: ShotPageProps) {
  const { shotId } = props;
  const q = useShot(shotId);
  const [previewParams, setPreviewParams] = useState<AnalysisOptionsInput | null>(null);
  const [editing, setEditing] = useState(false);
  // Removed files stay listed (struck out) but take no part in previews and traces.
  const captures = useMemo(() => (q.data?.captures ?? []).filter((c) => !c.removedAt), [q.data]);
  const preview = usePreview(captures, previewParams);
  const stored = (q.data?.currentAnalysis?.results ?? null) as ShotAnalysis | null;
  const showingPreview = previewParams != null && preview.results != null;
  const results = showingPreview ? preview.results : stored;

  const gateLabel = useCallback((position: number) => {
    const rig = props.rigLabels.find((g) => Math.abs(g.position - position) < 1e-6);
    if (rig) return `Gate ${rig.label}`;
    const order = (results?.gates ?? []).map((g) => g.position).sort((a, b) => a - b).indexOf(position);
    return `Gate ${order >= 0 ? order + 1 : '?'}`;
  }, [props.rigLabels, results]);

  if (q.isPending) return <Loading what="Loading the shot" />;
  if (q.isError) return <ErrorNote error={q.error} />;
  const { shot, analyses, currentAnalysis } = q.data;
  const status = shotStatus(shot.status);
  const deleted = !!shot.deletedAt;
  const frozen = shot.status === 'approved' || deleted;
  const missing = shot.missingConditions ?? [];
  const channelNames = plottedChannels(captures).map((c) => c.name);

  return (
    <div className="space-y-6">
      <header className="flex flex-wrap items-start justify-between gap-4">
        <div>
          <p className="text-sm text-harbour-500">
            <Link to={props.campaignPath} className="hover:underline">{props.campaignName ?? 'Campaign'}</Link>
          </p>
          <h1 className="mt-0.5 flex items-center gap-3 text-2xl font-semibold tracking-tight">
            Shot #{shot.number} <span data-testid="shot-status"><Badge tone={status.tone}>{status.label}</Badge></span>
            {isBusy(q.data) && <span className="text-sm font-normal text-harbour-500" role="status">working…</span>}
          </h1>
          <p className="mt-1 text-sm text-harbour-600">
            {formatDateTime(shot.firedAt)} · tube {formatKpa(shot.conditions.tubePressurePa)} · {shot.conditions.sealType || 'seal not logged'} ·
            ambient {formatCelsius(shot.conditions.ambientTemperatureK)}, {formatKpa(shot.conditions.ambientPressurePa, 4)} ·
            {' '}{props.projectileName ?? 'no projectile'} · {props.rigName ?? 'no gate rig'}
          </p>
          {shot.notes && <p className="mt-1 text-sm text-harbour-500">{shot.notes}</p>}
          {missing.length > 0 && <p className="mt-1 text-sm text-signal-800" data-testid="conditions-missing">Conditions missing: {missing.join(', ')}.</p>}
          <div className="mt-2 flex flex-wrap items-center gap-2">
            {props.canUpload && !frozen && props.conditionsEditor && !editing && (
              <Button variant="secondary" className="!py-1 text-xs" onClick={() => setEditing(true)}>Correct conditions</Button>
            )}
            {shot.status === 'approved' && <span className="text-xs text-harbour-500">Signed off: conditions and files are frozen.</span>}
            {shot.status !== 'approved' && <DeleteOrRestore labId={props.labId} shotId={shotId} number={shot.number} deleted={deleted} canDelete={props.canUpload} canRestore={props.canRestore} />}
          </div>
        </div>
        {props.aside}
      </header>
      {editing && props.conditionsEditor && <Card title={`Correct the conditions of shot #${shot.number}`}>{props.conditionsEditor(() => setEditing(false))}</Card>}

      <div className="grid gap-6 xl:grid-cols-[minmax(0,1fr)_minmax(0,2fr)]">
        <Card title={showingPreview ? 'Result (preview)' : currentAnalysis ? `Result · version ${currentAnalysis.version}` : 'Result'}>
          <ResultPanel
            results={results}
            preview={showingPreview}
            timeBaseConfirmation={showingPreview ? null : currentAnalysis?.timeBaseCheck?.confirmation ?? null}
            confirmTimeBase={!showingPreview && currentAnalysis && props.canRecompute
              ? <ConfirmTimeBase shotId={shotId} analysisId={currentAnalysis.id} version={currentAnalysis.version} />
              : null}
          />
        </Card>
        <Card title="Scope files">
          <div className="space-y-4">
            {props.canUpload && <CaptureDrop shotId={shotId} disabled={frozen} disabledReason={deleted ? 'This shot is deleted.' : 'This shot is signed off.'} />}
            <CaptureList labId={props.labId} shotId={shotId} captures={q.data.captures} canEdit={props.canUpload && !frozen} />
            {!props.canUpload && captures.length === 0 && <p className="text-sm text-harbour-500">No files yet. Experimenters drop the scope’s files here after the shot.</p>}
          </div>
        </Card>
      </div>

      <Card title="Traces">
        <TraceStack captures={captures} results={results} preview={showingPreview} gateLabel={gateLabel} />
      </Card>

      <div className="grid gap-6 xl:grid-cols-2">
        <div className="space-y-6">
          <Card title="Position against time"><PositionTimePlot results={results} /></Card>
          <Card title="Uncertainty budget"><UncertaintyBudget speed={results?.speed ?? null} /></Card>
        </div>
        <Card title="Analysis settings">
          {currentAnalysis ? (
            <AnalystPanel
              key={currentAnalysis.id}
              shotId={shotId}
              base={currentAnalysis.parameters}
              channelNames={channelNames}
              canRecompute={props.canRecompute && !frozen}
              onPreview={setPreviewParams}
              preview={preview}
            />
          ) : (
            <p className="text-sm text-harbour-500">Settings appear once the first analysis has run.</p>
          )}
        </Card>
      </div>

      <Card title="Versions">
        <VersionHistory shotId={shotId} analyses={analyses} currentId={shot.currentAnalysisId} />
      </Card>
    </div>
  );
}
