import type { ShotAnalysis } from '../../../../shared/analysis/types.ts';
import type { CaptureChannels } from '../../../lib/plotted-channels.ts';
import type { ShotInfo } from '../../shots/api/types.ts';

/** The parts of GET /api/shots/:shotId the comparison reads. */
export interface ComparedShot {
  shot: Omit<ShotInfo, 'notes' | 'currentAnalysisId'>;
  captures: CaptureChannels[];
  currentAnalysis: {
    id: string;
    version: number;
    state: string;
    engineVersion: string;
    parameters: Record<string, unknown>;
    results: ShotAnalysis | null;
    /** Whether the version is marked "check the time base" and whether an analyst has confirmed the read. */
    timeBaseCheck?: { flagged: boolean; blocksApproval: boolean } | null;
  } | null;
}

/** Names the route looks up for each shot (campaign, projectile, gate rig and its gate labels). */
export interface ShotNames {
  campaignName: string | null;
  projectileName: string | null;
  rigName: string | null;
  gateLabels: { position: number; label: string }[];
}
