// The printable shot report: the PDF is rendered to PNG pages with pdftoppm (Debian poppler-utils) and its text
// extracted with pdftotext, so the test sees what a reader would. The pages were also looked at by a person
// (see the final report of issue 7); the checks here are the facts that must hold on every run.
import { execFileSync } from 'node:child_process';
import { mkdirSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../server/db/models/index.ts';
import { createApiHarness, type ApiHarness } from '../helpers/api-harness.ts';
import { binaryBody } from '../helpers/binary-body.ts';
import { analysedShot } from './review-fixtures.ts';

let h: ApiHarness;
const outDir = path.join(import.meta.dirname, '../../.test-artifacts/report');

beforeAll(async () => {
  h = await createApiHarness();
  await h.resetDatabase();
  rmSync(outDir, { recursive: true, force: true });
  mkdirSync(outDir, { recursive: true });
});
afterAll(() => h?.close());

const as = (who: 'admin' | 'experimenter' | 'analyst' | 'reviewer') => ({ Cookie: h.sessionCookie(h.demo.users[who].id) });

describe('shot report PDF', () => {
  it('When a signed-off shot is printed, then the PDF has the conditions, the result with U and k, the budget, the traces, the version, the sign-off and the safety note', async () => {
    // Truth: the shot model was given 300 m/s at the first gate (tests/api/review-fixtures.ts).
    const shot = await analysedShot(h, { speed: 300 });
    expect((await request(h.app).post(`/api/shots/${shot.shotId}/review-requests`).set(as('analyst')).send({})).status).toBe(201);
    expect((await request(h.app).post(`/api/shots/${shot.shotId}/reviews`).set(as('reviewer')).send({ decision: 'approved' })).status).toBe(201);

    const res = await request(h.app).get(`/api/shots/${shot.shotId}/report.pdf`).set(as('experimenter')).buffer(true).parse(binaryBody);
    expect(res.status, String(res.body)).toBe(200);
    expect(res.headers['content-type']).toBe('application/pdf');
    expect(res.headers['content-disposition']).toBe(`attachment; filename=vacuum-sweep-autumn-2026-shot-${shot.shotNumber}-v1.pdf`);
    const pdf = res.body as Buffer;
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
    const file = path.join(outDir, 'signed-off.pdf');
    writeFileSync(file, pdf);

    const text = execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' });
    expect(text).toContain('Hollowmere Ballistics Lab');
    expect(text).toContain('Vacuum sweep, autumn 2026');
    expect(text).toContain(`Shot ${shot.shotNumber}`);
    expect(text).toMatch(/Tube pressure\s+2 kPa/);
    expect(text).toMatch(/Ambient temperature\s+20\.0 °C/);
    // The speed printed with U to two significant digits, and it is the model's 300 m/s within that U.
    const m = /(\d+\.\d+) ± (\d+\.\d+) m\/s/.exec(text);
    expect(m, text).not.toBeNull();
    expect(Math.abs(Number(m![1]) - 300)).toBeLessThanOrEqual(Number(m![2]));
    expect(text).toContain('coverage factor k = 2');
    expect(text).toContain('Uncertainty budget');
    expect(text).toMatch(/Signed off by Marek Vintner on \d{4}-\d{2}-\d{2} \(analysis version 1\)/);
    expect(text).toContain('Gate A: Gate A at 0 m');
    expect(text).toContain('Gate C: Gate C at 0.3 m');
    expect(text).toMatch(/Version\s+1/);
    expect(text).toContain('Parameters');
    expect(text).toContain('Launcher safety');
    expect(text).toContain('rated backstop');

    execFileSync('pdftoppm', ['-png', '-r', '70', file, path.join(outDir, 'signed-off')]);
    const pages = readdirSync(outDir).filter((f) => f.startsWith('signed-off') && f.endsWith('.png'));
    expect(pages.length).toBeGreaterThanOrEqual(2);

    expect(await AuditEvent.count({ where: { targetId: shot.shotId, action: 'shot.report' } })).toBe(1);
  });

  it('When a shot without an analysis is printed, then the PDF says so and "Not signed off"', async () => {
    const res = await request(h.app).get(`/api/shots/${h.demo.hollowmere.shotIds[0]}/report.pdf`).set(as('reviewer')).buffer(true).parse(binaryBody);
    expect(res.status, String(res.body)).toBe(200);
    const file = path.join(outDir, 'no-analysis.pdf');
    writeFileSync(file, res.body as Buffer);
    const text = execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' });
    expect(text).toContain('This shot has no finished analysis.');
    expect(text).toContain('Not signed off.');
    execFileSync('pdftoppm', ['-png', '-r', '50', file, path.join(outDir, 'no-analysis')]);
  });
});
