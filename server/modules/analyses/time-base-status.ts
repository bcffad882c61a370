import type { ShotAnalysis, TimeBaseCheckReason } from '../../../shared/analysis/types.ts';
import type { Analysis } from '../../db/models/index.ts';
import { AppError } from '../../lib/errors.ts';

/**
 * Where a version stands on "check the time base": the engine's flag and reasons (absent from results of engines
 * before 1.3.0: not flagged), an analyst's "I checked the time base" confirmation, and whether review may approve it.
 */
export function timeBaseStatus(a: Analysis, names: Map<string, string> = new Map()) {
  const check = (a.results as Partial<ShotAnalysis> | null)?.timeBaseCheck;
  const flagged = check?.flagged === true;
  const confirmation = a.timeBaseConfirmedAt
    ? {
        by: a.timeBaseConfirmedBy ? { id: a.timeBaseConfirmedBy, name: names.get(a.timeBaseConfirmedBy) ?? null } : null,
        at: a.timeBaseConfirmedAt,
        note: a.timeBaseConfirmationNote ?? '',
      }
    : null;
  return {
    flagged,
    reasons: (check?.reasons ?? []) as TimeBaseCheckReason[],
    confirmation,
    /** Flagged and not confirmed: review cannot approve this version. */
    blocksApproval: flagged && confirmation === null,
  };
}

/** The time-base state in one word for tables (exports, trends): null when not flagged. */
export function timeBaseState(a: Analysis): 'unchecked' | 'confirmed' | null {
  const s = timeBaseStatus(a);
  return !s.flagged ? null : s.confirmation ? 'confirmed' : 'unchecked';
}

/** Columns a table query needs for timeBaseStatus / timeBaseState besides the results. */
export const TIME_BASE_ATTRIBUTES = ['timeBaseConfirmedBy', 'timeBaseConfirmedAt', 'timeBaseConfirmationNote'] as const;

/** The 409 a reviewer gets when approving a flagged, unconfirmed version: what is wrong and the two ways out. */
export function timeBaseUncheckedError(a: Analysis): AppError {
  const { reasons } = timeBaseStatus(a);
  return new AppError(
    409,
    'time_base_unchecked',
    `Version ${a.version} is marked "check the time base", so it cannot be signed off yet: ${reasons.map((r) => r.message).join('; ')}. ` +
      'An analyst must confirm the read ("I checked the time base") or fix it in a new version first.',
    { reasons },
  );
}
