import { useCallback, useMemo, useState, type ReactNode } from 'react';
import { Link } from 'react-router-dom';
import type { ShotAnalysis } from '../../../../shared/analysis/types.ts';
import type { AnalysisOptionsInput } from '../../../../shared/contracts/analysis.ts';
import { Badge, Card, ErrorNote, Loading } from '../../../components/ui/primitives.tsx';
import { formatCelsius, formatDateTime, formatKpa } from '../../../lib/format.ts';
import { shotStatus } from '../../../lib/shot-status.ts';
import { usePreview } from '../api/preview.ts';
import { isBusy, useShot } from '../api/shot.ts';
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
  canUpload: boolean;
  canRecompute: boolean;
  aside?: ReactNode;
}

export function ShotPage(props: ShotPageProps) {
  const { shotId } = props;
  const q = useShot(shotId);
  const [previewParams, setPreviewParams] = useState<AnalysisOptionsInput | null>(null);
  const captures = useMemo(() => q.data?.captures ?? [], [q.data]);
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
  const frozen = shot.status === 'approved';
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
        </div>
        {props.aside}
      </header>

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
            {props.canUpload && <CaptureDrop shotId={shotId} disabled={frozen} disabledReason="This shot is signed off." />}
            <CaptureList shotId={shotId} captures={captures} canEdit={props.canUpload && !frozen} />
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
