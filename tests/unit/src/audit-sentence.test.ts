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
