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
    // Trace titles name each gate once, with its position.
    expect(text).toContain('Gate A · 0.0 mm');
    expect(text).toContain('Gate C · 300.0 mm');
    expect(text).not.toContain('Gate A: Gate A');
    expect(text).toMatch(/Status\s+Signed off/);
    // The time axis: round ticks (a 1-2-5 step, here 100 or 200 µs) in one SI prefix.
    const axis = /((?:-?\d+\s+){3,})time \(µs\)/.exec(text);
    expect(axis, text).not.toBeNull();
    const ticks = axis![1].trim().split(/\s+/).map(Number);
    const step = ticks[1] - ticks[0];
    expect([100, 200]).toContain(step);
    ticks.forEach((t, i) => expect(t).toBe(ticks[0] + i * step));
    expect(text).toMatch(/Version\s+1/);
    // The settings in the analyst panel's words and units, not the stored paths.
    expect(text).toContain('Analysis settings');
    expect(text).toMatch(/Threshold level\s+50 %/);
    expect(text).toMatch(/Gate 3 position\s+300 mm/);
    expect(text).not.toMatch(/gates\[0\]|trimFraction|^\s*seed\b/m);
    expect(text).toContain('Launcher safety');
    expect(text).toContain('rated backstop');

    execFileSync('pdftoppm', ['-png', '-r', '70', file, path.join(outDir, 'signed-off')]);
    const pages = readdirSync(outDir).filter((f) => f.startsWith('signed-off') && f.endsWith('.png'));
    expect(pages.length).toBeGreaterThanOrEqual(2);

    expect(await AuditEvent.count({ where: { targetId: shot.shotId, action: 'shot.report' } })).toBe(1);
  });

  it('When the time base was misread, then the speed is greyed with the reason, the "Check before trusting" box lists the flag and the file warnings, and the assumptions are stated', async () => {
    const shot = await analysedShot(h, { misreadInterval: 1 });
    const fetchPdf = async (name: string) => {
      const res = await request(h.app).get(`/api/shots/${shot.shotId}/report.pdf`).set(as('reviewer')).buffer(true).parse(binaryBody);
      expect(res.status, String(res.body)).toBe(200);
      const file = path.join(outDir, `${name}.pdf`);
      writeFileSync(file, res.body as Buffer);
      return { file, text: execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ') };
    };
    const { file, text } = await fetchPdf('time-base-unchecked');
    expect(text).toContain('Not a measurement until the time base is checked: the speed of 0.00006 m/s');
    expect(text).toContain('Check before trusting this result');
    expect(text).toContain('Check the time base: this result is not a measurement until an analyst confirms the read or a new version fixes it.');
    expect(text).toContain('the sample interval is 1 s, above 1 ms, yet the gates show pulses');
    expect(text).toContain('simulated.csv: the time column has no unit; seconds were assumed');
    expect(text).toContain('Assumptions behind the result');
    expect(text).toMatch(/Gate positions ± 0\.5 mm each \(rectangular\)/);
    expect(text).toMatch(/Time-base accuracy ± 50 ppm \(rectangular\)/);
    expect(text).toMatch(/Projectile length 40 mm ± 0\.1 mm \(rectangular\)/);
    expect(text).toMatch(/Threshold 50 % of each channel’s step, hysteresis ± 40 %/);
    expect(text).toMatch(/Sample interval 1 s, read from the time column \(column 1 has no unit: seconds assumed\); partly assumed/);
    execFileSync('pdftoppm', ['-png', '-r', '70', '-f', '1', '-l', '1', file, path.join(outDir, 'time-base-unchecked')]);

    const confirmed = await request(h.app).post(`/api/shots/${shot.shotId}/analyses/${shot.analysisId}/time-base-confirmation`)
      .set(as('analyst')).send({ note: 'slow-roll record, 1 s per point is right' });
    expect(confirmed.status).toBe(201);
    const after = await fetchPdf('time-base-confirmed');
    expect(after.text).not.toContain('Not a measurement until');
    expect(after.text).toMatch(/Check the time base: confirmed by .+ on \d{4}-\d{2}-\d{2} \("slow-roll record, 1 s per point is right"\)\./);
  });

  it('When a gate missed, then its trace shades the sub-threshold dip with its span and depth, inside the plot', async () => {
    // Truth: the model's third gate dips to 38 % of the 4.6 V step (1.75 V) while the ball's chord crosses its beam.
    const shot = await analysedShot(h, { dipDepth: [1, 1, 0.38] });
    const res = await request(h.app).get(`/api/shots/${shot.shotId}/report.pdf`).set(as('reviewer')).buffer(true).parse(binaryBody);
    expect(res.status, String(res.body)).toBe(200);
    const file = path.join(outDir, 'missed-gate.pdf');
    writeFileSync(file, res.body as Buffer);
    const text = execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ');
    expect(text).toMatch(/dip 10\d\d\.\d–11\d\d\.\d µs · 1\.7\d V deep \(3[789] % of the step\)/);
    expect(text).toContain('Gate C · 300.0 mm');
    expect(text).toContain('missed: its step (1.75 V) is below 50.0 % of the reference step');
    execFileSync('pdftoppm', ['-png', '-r', '110', '-f', '2', '-l', '2', file, path.join(outDir, 'missed-gate')]);
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
