import { z } from 'zod';

/**
 * Queue names, job payloads and job ids shared by the API (which queues jobs) and the worker (which runs them).
 * Job ids are deterministic, so queueing the same work twice (a retried request, the worker's recovery sweep)
 * adds nothing: BullMQ keeps one job per id.
 */
export const QUEUE_NAMES = {
  /** Import a stored capture file into channel arrays and trace pyramids. */
  ingest: 'gatepost-ingest',
  /** Run the analysis engine for one analysis version. */
  analysis: 'gatepost-analysis',
} as const;

export const JOB_NAMES = { ingest: 'ingest-capture', analysis: 'analyse-shot' } as const;

export const ingestJobData = z.object({ captureId: z.uuid(), attempt: z.number().int().min(1) });
export type IngestJobData = z.infer<typeof ingestJobData>;

export const analysisJobData = z.object({ analysisId: z.uuid() });
export type AnalysisJobData = z.infer<typeof analysisJobData>;

export const ingestJobId = (d: IngestJobData) => `ingest-${d.captureId}-${d.attempt}`;
export const analysisJobId = (d: AnalysisJobData) => `analysis-${d.analysisId}`;
