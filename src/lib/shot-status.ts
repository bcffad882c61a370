/** Words and badge tone for each shot status, the same on every screen. */
export const SHOT_STATUS: Record<string, { label: string; tone: 'neutral' | 'signal' | 'good' | 'bad' }> = {
  draft: { label: 'Awaiting files', tone: 'neutral' },
  processing: { label: 'Processing', tone: 'signal' },
  analysed: { label: 'Analysed', tone: 'neutral' },
  in_review: { label: 'In review', tone: 'signal' },
  approved: { label: 'Signed off', tone: 'good' },
  returned: { label: 'Returned', tone: 'bad' },
  failed: { label: 'Failed', tone: 'bad' },
};

export const shotStatus = (status: string) => SHOT_STATUS[status] ?? { label: status, tone: 'neutral' as const };
