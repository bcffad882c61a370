// One word per state wherever people read it: the status and decision tables, CSV cells, e-mails, reports and pages.
// The words are the ones the pages already used most: "Signed off", "Returned", "Awaiting files".
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import ts from 'typescript';
import { describe, expect, it } from 'vitest';
import { BANNED_STATUS_WORDS, REVIEW_DECISION_LABELS, SHOT_STATUS_LABELS, SHOT_STATUSES } from '../../../shared/contracts/shot-status.ts';
import { csvWords } from '../../../server/modules/exports/csv-words.ts';

const root = path.join(import.meta.dirname, '../../..');
const banned = (text: string) => BANNED_STATUS_WORDS.filter((re) => re.test(text)).map(String);

function files(dir: string, out: string[] = []): string[] {
  for (const name of readdirSync(dir)) {
    const p = path.join(dir, name);
    if (statSync(p).isDirectory()) files(p, out);
    else if (/\.(ts|tsx)$/.test(name)) out.push(p);
  }
  return out;
}

/**
 * Text a person reads in a source file, found by the TypeScript parser: string and template literals with a space
 * in them (a bare 'approved' is an API value, not a sentence) and JSX text.
 */
function readableText(file: string, source: string): string[] {
  const sf = ts.createSourceFile(file, source, ts.ScriptTarget.Latest, true, file.endsWith('.tsx') ? ts.ScriptKind.TSX : ts.ScriptKind.TS);
  const out: string[] = [];
  const visit = (node: ts.Node) => {
    if (ts.isStringLiteral(node) || ts.isNoSubstitutionTemplateLiteral(node) || ts.isTemplateHead(node) || ts.isTemplateMiddle(node) || ts.isTemplateTail(node) || ts.isJsxText(node)) {
      const text = node.text;
      // SQL compares the stored values, which stay the API's.
      if (/\S\s+\S/.test(text) && !/\b(CASE|SELECT|WHEN)\b/.test(text)) out.push(text);
    }
    ts.forEachChild(node, visit);
  };
  visit(sf);
  return out;
}

describe('one word per state', () => {
  it('every status and decision has a label, and no label is a banned alternate', () => {
    for (const s of SHOT_STATUSES) expect(SHOT_STATUS_LABELS[s]).toBeTruthy();
    expect(SHOT_STATUS_LABELS.approved).toBe('Signed off');
    expect(SHOT_STATUS_LABELS.returned).toBe('Returned');
    expect(SHOT_STATUS_LABELS.draft).toBe('Awaiting files');
    expect(REVIEW_DECISION_LABELS).toEqual({ approved: 'Signed off', returned: 'Returned' });
    for (const label of [...Object.values(SHOT_STATUS_LABELS), ...Object.values(REVIEW_DECISION_LABELS)]) expect(banned(label)).toEqual([]);
  });

  it('CSV cells use the words; other columns pass through', () => {
    for (const s of SHOT_STATUSES) expect(banned(String(csvWords('status', s)))).toEqual([]);
    expect(csvWords('reviewDecision', 'approved')).toBe('Signed off');
    expect(csvWords('reviewDecision', 'returned')).toBe('Returned');
    expect(csvWords('reviewDecision', null)).toBeNull();
    expect(csvWords('sealType', 'draft seal')).toBe('draft seal');
  });

  it('no page, e-mail, report or export text says "approved", "sent back" or "draft" for a state', () => {
    const sources = [
      ...files(path.join(root, 'src')),
      ...files(path.join(root, 'server/modules/notifications')),
      ...files(path.join(root, 'server/modules/reports')),
      ...files(path.join(root, 'server/modules/exports')),
      ...files(path.join(root, 'server/modules/reviews')),
      ...files(path.join(root, 'server/modules/shots')),
      ...files(path.join(root, 'server/modules/analyses')),
    ];
    const found: string[] = [];
    for (const f of sources) {
      for (const text of readableText(f, readFileSync(f, 'utf8'))) {
        if (banned(text).length > 0) found.push(`${path.relative(root, f)}: ${text.trim().slice(0, 100)}`);
      }
    }
    expect(found).toEqual([]);
  });
});
