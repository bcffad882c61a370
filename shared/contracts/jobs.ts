import * as z from 'zod';

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
  /** Send one notification e-mail (retried when the mail server hiccups; never part of a request). */
  notify: 'gatepost-notify',
} as const;

export const JOB_NAMES = { ingest: 'ingest-capture', analysis: 'analyse-shot', notify: 'send-notification' } as const;

export const ingestJobData = z.object({ captureId: z.uuid(), attempt: z.number().int().min(1) });
export type IngestJobData = z.infer<typeof ingestJobData>;

/**
 * `precomputed`: the results the API worked out in the thread that read the upload, which still held its samples
 * (uploads.ts storeReadChannels), with the captures and parameters they are for. The job stores them instead of
 * reading the channel files and running the engine again, when they are for exactly the version's captures and
 * parameters; otherwise it ignores them. The API now stores such numbers on the version itself when it makes it
 * (automaticVersionIn) and queues no job; jobs queued with them by an earlier release are still taken.
 */
export const analysisJobData = z.object({
  analysisId: z.uuid(),
  precomputed: z.object({ captureIds: z.array(z.uuid()), parameters: z.unknown(), results: z.record(z.string(), z.unknown()) }).optional(),
});
export type AnalysisJobData = z.infer<typeof analysisJobData>;

export const ingestJobId = (d: IngestJobData) => `ingest-${d.captureId}-${d.attempt}`;
export const analysisJobId = (d: AnalysisJobData) => `analysis-${d.analysisId}`;

/**
 * One e-mail to one person about one event. `eventId` names the event (a review request, a decision, a failed job),
 * so the job id is the same however often the event is reported: one mail per person per event.
 */
export const notifyJobData = z.object({
  kind: z.enum(['reviewRequested', 'approved', 'returned', 'jobFailed']),
  recipientId: z.uuid(),
  labId: z.uuid(),
  shotId: z.uuid(),
  eventId: z.string().min(1).max(200),
  /** What failed, for jobFailed: the importer's or the engine's message. */
  error: z.string().max(2000).optional(),
});
export type NotifyJobData = z.infer<typeof notifyJobData>;
export const notifyJobId = (d: NotifyJobData) => `notify-${d.kind}-${d.eventId}-${d.recipientId}`;
