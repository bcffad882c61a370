/**
 * An audit event as a sentence in the lab's words: "Marek Vintner signed off shot #5 (version 2) of Vacuum sweep,
 * autumn 2026". The shot part is returned apart so pages can make it a link; raw ids stay in the event's details.
 */
export interface AuditEventLike {
  action: string;
  actor: string | null;
  details: Record<string, unknown>;
  shot?: { id: string; number: number; campaignName: string | null } | null;
  campaign?: { id: string; name: string | null } | null;
}

export interface AuditSentence {
  /** Who: the person's name, or "Gatepost" for what the system did itself. */
  who: string;
  /** The verb phrase before the shot ("signed off"). */
  verb: string;
  /** "shot #5 (version 2)", or null when the event is not about a shot. */
  shot: string | null;
  /** What follows the shot (" of Vacuum sweep, autumn 2026: “comment”"), or the rest of the sentence. */
  rest: string;
}

/** The kinds of event people filter by (the part of `action` before its dot), in their words. */
export const AUDIT_KINDS: Record<string, string> = {
  shot: 'Shots logged, corrected, deleted',
  capture: 'Files added or removed',
  analysis: 'Recomputations',
  review: 'Reviews',
  comment: 'Comments',
  campaign: 'Campaigns',
  member: 'Members',
  invitation: 'Invitations',
  token: 'API tokens',
  auth: 'Sign-ins',
  account: 'Passwords and sessions',
};

const CONDITION_WORDS: Record<string, string> = {
  tubePressurePa: 'tube vacuum', sealType: 'seal', projectileId: 'projectile', gateRigId: 'gate rig',
  ambientTemperatureK: 'ambient temperature', ambientPressurePa: 'ambient pressure', notes: 'notes', firedAt: 'time fired',
};
const ROLE_WORDS: Record<string, string> = { admin: 'lab admin', experimenter: 'experimenter', analyst: 'analyst', reviewer: 'reviewer' };

const str = (x: unknown) => (typeof x === 'string' ? x : x == null ? '' : String(x));
const version = (d: Record<string, unknown>) => (typeof d.version === 'number' ? ` (version ${d.version})` : '');
/** Longest quoted comment in a sentence; the whole text stays in the event's details. */
export const QUOTE_MAX_CHARS = 200;
/** A person's words, quoted after a colon and cut at a word boundary (with "…") when longer than QUOTE_MAX_CHARS. */
const quote = (x: unknown) => {
  const text = str(x).trim().replace(/\s+/g, ' ');
  if (!text) return '';
  if (text.length <= QUOTE_MAX_CHARS) return `: “${text}”`;
  const cut = text.slice(0, QUOTE_MAX_CHARS);
  const space = cut.lastIndexOf(' ');
  return `: “${(space > QUOTE_MAX_CHARS / 2 ? cut.slice(0, space) : cut).replace(/[\s,;:.]+$/, '')}…”`;
};

export function auditSentence(e: AuditEventLike, options: { thisShot?: boolean } = {}): AuditSentence {
  const d = e.details ?? {};
  const who = e.actor ?? 'Gatepost';
  const shotName = e.shot ? `shot #${e.shot.number}` : options.thisShot ? 'this shot' : 'a shot';
  const of = e.shot?.campaignName && !options.thisShot ? ` of ${e.shot.campaignName}` : '';
  const aboutShot = (verb: string, shotSuffix = '', rest = '') => ({ who, verb, shot: `${shotName}${shotSuffix}`, rest: `${of}${rest}` });
  switch (e.action) {
    case 'shot.created': return aboutShot('logged');
    case 'shot.updated': {
      const keys = Object.keys((d.after as Record<string, unknown> | undefined) ?? {});
      return aboutShot('corrected the conditions of', '', keys.length ? `: ${keys.map((k) => CONDITION_WORDS[k] ?? k).join(', ')}` : '');
    }
    case 'shot.deleted': return aboutShot('deleted');
    case 'shot.restored': return aboutShot('restored');
    case 'shot.exported': return aboutShot(`exported (${str(d.format).toUpperCase() || 'file'})`, version(d));
    case 'shot.report': return aboutShot('printed the report of', version(d));
    case 'capture.uploaded': return aboutShot(`added the file ${str(d.file)} to`);
    case 'capture.removed': return aboutShot(`removed the file ${str(d.file)} from`);
    case 'capture.reingest': return aboutShot('had a file read again with other settings on');
    case 'analysis.requested': return aboutShot('recomputed', version(d));
    case 'review.requested': return aboutShot('sent', version(d), ` for review${d.timeBaseUnchecked ? ', marked “check the time base”' : ''}${quote(d.message)}`);
    case 'review.approved': return aboutShot('signed off', version(d), quote(d.comment));
    case 'review.returned': return aboutShot('returned', version(d), quote(d.comment));
    case 'review.withdrawn': return { who: 'Gatepost', verb: 'withdrew the review request of', shot: shotName, rest: `${of}${d.reason ? `: ${str(d.reason)}` : ''}` };
    case 'comment.added': return aboutShot(d.replyTo ? 'replied to a comment on' : 'commented on');
    case 'campaign.created': return { who, verb: 'started the campaign', shot: null, rest: ` ${str(d.name) || e.campaign?.name || ''}` };
    case 'campaign.updated': return { who, verb: 'changed the campaign', shot: null, rest: ` ${e.campaign?.name ?? ''}` };
    case 'campaign.exported': return { who, verb: 'exported the campaign', shot: null, rest: ` ${e.campaign?.name ?? ''} (${str(d.format).toUpperCase()}, ${str(d.shots)} shots)` };
    case 'invitation.sent': return { who, verb: 'invited', shot: null, rest: ` ${str(d.email)} as ${ROLE_WORDS[str(d.role)] ?? str(d.role)}` };
    case 'invitation.accepted': return { who, verb: 'joined the lab', shot: null, rest: ` as ${ROLE_WORDS[str(d.role)] ?? str(d.role)}` };
    case 'invitation.withdrawn': return { who, verb: 'withdrew an invitation', shot: null, rest: '' };
    case 'member.role_changed': return { who, verb: "changed a member's role", shot: null, rest: ` from ${ROLE_WORDS[str(d.from)] ?? str(d.from)} to ${ROLE_WORDS[str(d.to)] ?? str(d.to)}` };
    case 'member.removed': return { who, verb: 'removed a member', shot: null, rest: ` (${ROLE_WORDS[str(d.role)] ?? str(d.role)})` };
    case 'member.disabled': return { who, verb: 'disabled the account of', shot: null, rest: ` ${str(d.name) || 'a member'} (${ROLE_WORDS[str(d.role)] ?? str(d.role)}): signed out everywhere, tokens stopped` };
    case 'member.enabled': return { who, verb: 'enabled the account of', shot: null, rest: ` ${str(d.name) || 'a member'} again` };
    case 'member.sign_in_unlocked': return { who, verb: "cleared a member's failed sign-ins", shot: null, rest: '' };
    case 'account.password_changed': return { who, verb: 'changed their password', shot: null, rest: ' (other sessions signed out)' };
    case 'account.signed_out_everywhere': return { who, verb: 'signed out everywhere', shot: null, rest: '' };
    case 'account.password_reset_requested': return { who, verb: 'asked for a password reset link', shot: null, rest: '' };
    case 'account.password_reset': return { who, verb: 'set a new password with a reset link', shot: null, rest: ' (every session signed out)' };
    case 'token.created': return { who, verb: 'made a personal API token', shot: null, rest: '' };
    case 'token.revoked': return { who, verb: 'revoked a personal API token', shot: null, rest: '' };
    case 'auth.login': return { who, verb: 'signed in', shot: null, rest: '' };
    case 'auth.logout': return { who, verb: 'signed out', shot: null, rest: '' };
    case 'auth.login_failed': return { who, verb: 'failed to sign in', shot: null, rest: '' };
    default: return { who, verb: e.action, shot: e.shot ? shotName : null, rest: of };
  }
}
