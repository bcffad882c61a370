import type { BudgetLineValues } from '../../../../shared/contracts/analysis-labels.ts';
import type { AnalysisOptions } from '../../../../shared/contracts/analysis.ts';
import type { ShotAnalysis, TimeBaseCheckReason } from '../../../../shared/analysis/types.ts';

export interface ChannelFileInfo { index: number; name: string; unit: string; sourceUnit: string; invalidCount: number; length: number }

export interface CaptureInfo {
  id: string;
  fileName: string;
  sizeBytes: number;
  sha256: string;
  state: 'queued' | 'reading' | 'ready' | 'failed';
  progress: number;
  error: string | null;
  warnings: string[];
  layout: Record<string, unknown> | null;
  channels: { length: number; time: { kind: 'uniform'; t0: number; dt: number; jitter: number } | { kind: 'explicit'; first: number | null; last: number | null }; channels: ChannelFileInfo[] } | null;
  sampleCount: number | null;
  importOptions: Record<string, unknown>;
  ingestAttempt: number;
  uploadedAt: string;
  /** Set when the file was removed from the shot (kept stored and in older versions). */
  removedAt?: string | null;
}

export interface AnalysisSummary {
  id: string;
  version: number;
  state: 'queued' | 'running' | 'done' | 'failed';
  progress: number;
  error: string | null;
  engineVersion: string;
  requestedBy: string | null;
  /** Name of the person who asked for this version (GET /api/shots/:shotId only); null when automatic. */
  requestedByName?: string | null;
  createdAt: string;
  startedAt: string | null;
  completedAt: string | null;
}

/** An analyst's "I checked the time base" on a version marked "check the time base". */
export interface TimeBaseConfirmation {
  by: { id: string; name: string | null } | null;
  at: string;
  note: string;
}

/** Where a version stands on "check the time base" (GET …/analyses/:id, GET /api/shots/:id). */
export interface TimeBaseStatus {
  flagged: boolean;
  reasons: TimeBaseCheckReason[];
  confirmation: TimeBaseConfirmation | null;
  /** Flagged and not confirmed: review cannot approve the version. */
  blocksApproval: boolean;
}

export interface AnalysisFull extends AnalysisSummary {
  parameters: AnalysisOptions;
  captureIds: string[];
  results: ShotAnalysis | null;
  /** Absent from servers before issue 10. */
  timeBaseCheck?: TimeBaseStatus;
}

export interface ShotInfo {
  id: string;
  campaignId: string;
  number: number;
  firedAt: string | null;
  status: string;
  projectileId: string | null;
  gateRigId: string | null;
  conditions: { tubePressurePa: number | null; sealType: string; ambientTemperatureK: number | null; ambientPressurePa: number | null };
  notes: string;
  currentAnalysisId: string | null;
  /** Set when the shot was deleted (an admin can restore it). */
  deletedAt?: string | null;
  /** Labels of the conditions its campaign needs that the shot has not logged ("conditions missing"). */
  missingConditions?: string[];
}

export interface ShotDetail {
  shot: ShotInfo;
  captures: CaptureInfo[];
  analyses: AnalysisSummary[];
  currentAnalysis: AnalysisFull | null;
}

export interface DiffEntry { path: string; kind: 'added' | 'removed' | 'changed'; from?: unknown; to?: unknown }
export interface VersionDiff {
  from: AnalysisSummary;
  to: AnalysisSummary;
  engineChanged: boolean;
  parameters: DiffEntry[];
  results: DiffEntry[];
  speed?: { from: { value: number; uncertainty: number } | null; to: { value: number; uncertainty: number } | null };
  thresholdUnit?: { from: 'percent' | 'volts'; to: 'percent' | 'volts' };
  /** Each version's budget whole (absent from servers before issue 11's budget naming). */
  budget?: { from: BudgetLineValues[] | null; to: BudgetLineValues[] | null };
}

export type { TraceWindow } from '../../../lib/trace-window.ts';
