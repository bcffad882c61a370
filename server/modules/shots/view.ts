import type { Analysis, Capture, Shot } from '../../db/models/index.ts';
import { timeBaseStatus } from '../analyses/time-base-status.ts';

/** The shot as the API shows it: SI values, named with their unit. */
export function shotSummary(s: Shot) {
  return {
    id: s.id,
    campaignId: s.campaignId,
    number: s.number,
    firedAt: s.firedAt,
    status: s.status,
    projectileId: s.projectileId,
    gateRigId: s.gateRigId,
    conditions: {
      tubePressurePa: s.tubePressurePa,
      sealType: s.sealType,
      ambientTemperatureK: s.ambientTemperatureK,
      ambientPressurePa: s.ambientPressurePa,
    },
    notes: s.notes,
    currentAnalysisId: s.currentAnalysisId,
    /** The version waiting for review, and the version signed off last (it stays on record after a recomputation). */
    reviewAnalysisId: s.reviewAnalysisId ?? null,
    approvedAnalysisId: s.approvedAnalysisId ?? null,
    /** Set when the shot was deleted (kept for the record; an admin can restore it). */
    deletedAt: s.deletedAt ?? null,
  };
}

export function captureView(c: Capture) {
  return {
    id: c.id,
    fileName: c.fileName,
    sizeBytes: Number(c.sizeBytes),
    sha256: c.sha256,
    state: c.state,
    progress: c.progress,
    error: c.error,
    warnings: c.warnings,
    layout: c.layout,
    channels: c.channels,
    sampleCount: c.sampleCount == null ? null : Number(c.sampleCount),
    timeBase: c.timeBase,
    importOptions: c.importOptions,
    ingestAttempt: c.ingestAttempt,
    uploadedAt: c.uploadedAt,
    /** Set when the file was removed from the shot (its bytes stay stored; versions that read it still name it). */
    removedAt: c.removedAt ?? null,
  };
}

/** An analysis version without its (large) results: for lists and progress. */
export function analysisSummary(a: Analysis) {
  return {
    id: a.id,
    version: a.version,
    state: a.state,
    progress: a.progress,
    error: a.error,
    engineVersion: a.engineVersion,
    requestedBy: a.requestedBy,
    /** The batch recompute that made this version, or null. */
    batchId: a.batchId ?? null,
    createdAt: a.createdAt,
    startedAt: a.startedAt,
    completedAt: a.completedAt,
  };
}

/** A version with its results; `names` resolves who confirmed its time base (see timeBaseStatus). */
export function analysisView(a: Analysis, names?: Map<string, string>) {
  return { ...analysisSummary(a), parameters: a.parameters, captureIds: a.captureIds, results: a.results, timeBaseCheck: timeBaseStatus(a, names) };
}
