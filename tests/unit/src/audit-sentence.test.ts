import { describe, expect, it } from 'vitest';
import { auditSentence } from '../../../src/lib/audit-sentence.ts';

describe('auditSentence of account events (issue 12, item 10)', () => {
  it('When an admin disables a member, then the sentence names the member and what it did', () => {
    const s = auditSentence({ action: 'member.disabled', actor: 'Ines Calder', details: { role: 'experimenter', name: 'Tomas Reyes' } });
    expect(`${s.who} ${s.verb}${s.rest}`).toBe('Ines Calder disabled the account of Tomas Reyes (experimenter): signed out everywhere, tokens stopped');
  });
  it('When a password is reset, then the sentence says every session was signed out', () => {
    const s = auditSentence({ action: 'account.password_reset', actor: 'Tomas Reyes', details: {} });
    expect(`${s.who} ${s.verb}${s.rest}`).toBe('Tomas Reyes set a new password with a reset link (every session signed out)');
  });
});

describe('auditSentence of review decisions (issue 11 review, gap b)', () => {
  const shot = { id: 's5', number: 5, campaignName: 'Vacuum sweep, autumn 2026' };
  const line = (s: ReturnType<typeof auditSentence>) => `${s.who} ${s.verb} ${s.shot}${s.rest}`;
  it('When a reviewer signs off with a comment, then the sentence quotes it', () => {
    const s = auditSentence({ action: 'review.approved', actor: 'Marek Vintner', shot, details: { version: 2, comment: 'Residuals flat; fine for the report.' } });
    expect(line(s)).toBe('Marek Vintner signed off shot #5 (version 2) of Vacuum sweep, autumn 2026: “Residuals flat; fine for the report.”');
  });
  it('When a sign-off has no comment, then the sentence ends after the campaign', () => {
    const s = auditSentence({ action: 'review.approved', actor: 'Marek Vintner', shot, details: { version: 2, comment: null } });
    expect(line(s)).toBe('Marek Vintner signed off shot #5 (version 2) of Vacuum sweep, autumn 2026');
  });
  it('When a return comment is long, then the sentence quotes its start, cut at a word, with an ellipsis', () => {
    const comment = `${'Gate C dip is real. '.repeat(15)}Last words.`;
    const s = auditSentence({ action: 'review.returned', actor: 'Marek Vintner', shot, details: { version: 1, comment } });
    const quoted = /: “(.*)”$/.exec(s.rest)![1];
    expect(quoted.endsWith('…')).toBe(true);
    expect(quoted.length).toBeLessThanOrEqual(201);
    expect(comment.startsWith(quoted.slice(0, -1))).toBe(true);
    expect(quoted).not.toContain('Last words');
    expect(quoted.slice(0, -1)).toMatch(/real$/);
  });
  it('When a version marked "check the time base" is sent for review, then the sentence says so', () => {
    const s = auditSentence({ action: 'review.requested', actor: 'Tomas Reyl', shot, details: { version: 1, message: 'slow roll', timeBaseUnchecked: true } });
    expect(line(s)).toBe('Tomas Reyl sent shot #5 (version 1) of Vacuum sweep, autumn 2026 for review, marked “check the time base”: “slow roll”');
  });
});
