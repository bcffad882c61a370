import { SHOT_STATUS_LABELS, type ShotStatus } from '../../shared/contracts/shot-status.ts';

type Tone = 'neutral' | 'signal' | 'good' | 'bad';
const TONES: Record<ShotStatus, Tone> = {
  draft: 'neutral', processing: 'signal', analysed: 'neutral', in_review: 'signal', approved: 'good', returned: 'bad', failed: 'bad',
};

/** Words (shared/contracts/shot-status.ts, the same in exports, e-mails and reports) and badge tone for each status. */
export const SHOT_STATUS: Record<string, { label: string; tone: Tone }> = Object.fromEntries(
  (Object.keys(SHOT_STATUS_LABELS) as ShotStatus[]).map((s) => [s, { label: SHOT_STATUS_LABELS[s], tone: TONES[s] }]),
);

export const shotStatus = (status: string) => SHOT_STATUS[status] ?? { label: status, tone: 'neutral' as const };
