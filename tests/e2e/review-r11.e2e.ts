// A second look at issue 11 in Chromium (review r11), against the real API and worker. Each part fails on the code
// before it: (a) Sandgate's drop tower asks only for rig and projectile and none of its shots says "conditions
// missing"; (b) a sign-off's comment is quoted in the audit trail; (c) "expected at Gate C (v ± U)" stays clear of a
// missed gate's dip, inside the plot, at 1280 and 820 px; (d) a version marked "check the time base" warns when it is
// sent for review, and says so in the review queue and the comparison. Screenshots at 1280 and 820 px wide.
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { pollUntil, signIn as apiSignIn, type PipelineClient } from '../../bench/lib/pipeline-client.ts';
import { writeCaptureLayout } from '../../fixtures/lib/write-capture-layout.ts';
import { Projectile, Shot } from '../../server/db/models/index.ts';
import { simulateShot } from '../../shared/simulate/simulate-shot.ts';
import { createApiHarness, type ApiHarness } from '../helpers/api-harness.ts';
import { startAppProcesses, type AppProcesses } from '../helpers/app-processes.ts';
import { saveScreenshot, saveScreenshotsAtBothWidths, signInBrowser } from '../helpers/browser.ts';

let harness: ApiHarness;
let app: AppProcesses;
let experimenter: PipelineClient;
let reviewer: PipelineClient;
let labId: string;
const ids = { flagged: '', plain: '', missed: '' };

/** Logs a shot in the sweep, uploads the simulated record (dt: the interval written in the file) and waits for it. */
async function analysedShot(number: number, options: { dt?: number; dipDepth?: number[]; seed: number }) {
  const ball = await Projectile.findOne({ where: { labId, name: 'Table-tennis ball, 40 mm' }, rejectOnEmpty: true });
  const created = await experimenter.post<{ shot: { id: string } }>(`/api/labs/${labId}/shots`, {
    campaignId: harness.demo.hollowmere.campaignIds[0], projectileId: ball.id, gateRigId: harness.demo.hollowmere.gateRigIds[0], number,
    tubePressurePa: 2100, sealType: 'Polyester film, 50 µm', ambientTemperatureK: 293.15, ambientPressurePa: 100_900, firedAt: new Date().toISOString(),
  });
  expect(created.status, JSON.stringify(created.body)).toBe(201);
  const shotId = created.body.shot.id;
  const shot = simulateShot({
    speed: 300, diameter: 0.04, sampleInterval: 2e-7, length: 8000, t0: -1e-4, arrivalTime: 1e-4, noiseRms: 0.01, responseTime: 1e-6, seed: options.seed,
    gatePositions: [0, 0.15, 0.3], channelNames: ['Gate A', 'Gate B', 'Gate C'], dipDepth: options.dipDepth ?? 1,
  });
  // dt = 1: sample numbers written under "Time (s)", so every duration reads 5·10⁶ times too long (flagged).
  const { bytes } = writeCaptureLayout('plain-time', { t0: options.dt === 1 ? 0 : -1e-4, dt: options.dt ?? 2e-7, channels: shot.channels });
  expect((await experimenter.upload(shotId, [{ name: `shot-${number}.csv`, bytes }])).status).toBe(202);
  await pollUntil(async () => {
    const d = (await experimenter.get<{ shot: { status: string }; currentAnalysis: { state: string } | null }>(`/api/shots/${shotId}`)).body;
    return d.currentAnalysis?.state === 'done' && d.shot.status === 'analysed' ? d : undefined;
  }, { timeoutMs: 120_000, intervalMs: 200, what: `shot ${number} analysed` });
  return shotId;
}

beforeAll(async () => {
  harness = await createApiHarness();
  const demo = await harness.resetDatabase();
  labId = demo.labs.hollowmere.id;
  app = await startAppProcesses({ env: { GATEPOST_SMTP_PORT: String(harness.smtpPort), GATEPOST_LOG_LEVEL: 'warn' } });
  experimenter = await apiSignIn(app.baseUrl, demo.users.experimenter.email, demo.users.experimenter.password);
  reviewer = await apiSignIn(app.baseUrl, demo.users.reviewer.email, demo.users.reviewer.password);
  ids.flagged = await analysedShot(401, { dt: 1, seed: 21 });
  ids.plain = await analysedShot(402, { seed: 22 });
  // Gate C's dip reaches 40 % of the step: missed at the automatic 50 % threshold.
  ids.missed = await analysedShot(403, { seed: 23, dipDepth: [1, 1, 0.4] });
}, 300_000);

afterAll(async () => {
  await app?.stop();
  await harness?.close();
});

const reviewBar = (page: Page) => page.getByRole('region', { name: 'Review', exact: true });

describe('issue 11, second look', () => {
  it('When a version marked "check the time base" is sent for review, then the sender is warned, and the queue and the comparison say so', async () => {
    const { context, page } = await signInBrowser(app.baseUrl, harness.demo.users.experimenter);
    try {
      await page.goto(`${app.baseUrl}/labs/${labId}/shots/${ids.flagged}`);
      await reviewBar(page).getByRole('button', { name: 'Send for review…' }).click();
      const warning = page.getByTestId('send-time-base-warning');
      await warning.waitFor();
      expect(await warning.textContent()).toMatch(/^Version 1 is marked “check the time base”\. A reviewer can return it but cannot sign it off/);
      await saveScreenshotsAtBothWidths(page, 'r11-send-time-base-warning');
      await reviewBar(page).getByRole('button', { name: 'Send anyway' }).click();
      await reviewBar(page).getByText('Version 1 is waiting for review').waitFor({ timeout: 30_000 });
    } finally {
      await context.close();
    }
    const { context: rc, page: rp } = await signInBrowser(app.baseUrl, harness.demo.users.reviewer);
    try {
      await rp.goto(`${app.baseUrl}/labs/${labId}/review-queue`);
      await rp.getByTestId('queue-time-base').waitFor();
      await saveScreenshotsAtBothWidths(rp, 'r11-review-queue-time-base');
      await rp.goto(`${app.baseUrl}/labs/${labId}/compare?shots=${ids.flagged},${ids.plain}`);
      const cells = rp.getByTestId('compare-time-base');
      await cells.first().waitFor({ timeout: 30_000 });
      expect(await cells.allTextContents()).toEqual(['check the time base: not a measurement until an analyst confirms the read', 'not flagged']);
      expect(await cells.first().getAttribute('data-unchecked')).toBe('true');
      await saveScreenshotsAtBothWidths(rp, 'r11-compare-time-base');
    } finally {
      await rc.close();
    }
  }, 120_000);

  it('When a reviewer signs a shot off with a comment, then the audit trail quotes it', async () => {
    expect((await experimenter.post(`/api/shots/${ids.plain}/review-requests`, {})).status).toBe(201);
    expect((await reviewer.post(`/api/shots/${ids.plain}/reviews`, { decision: 'approved', comment: 'Three-gate fit, residuals flat. Fine for the report.' })).status).toBe(201);
    const { context, page } = await signInBrowser(app.baseUrl, harness.demo.users.reviewer);
    try {
      await page.goto(`${app.baseUrl}/labs/${labId}/audit`);
      const entry = page.getByRole('listitem').filter({ hasText: 'signed off shot #402' });
      await entry.waitFor();
      expect(await entry.locator('p').first().textContent()).toBe('Marek Vintner signed off shot #402 (version 1) of Vacuum sweep, autumn 2026: “Three-gate fit, residuals flat. Fine for the report.”');
      await saveScreenshotsAtBothWidths(page, 'r11-audit-sign-off-comment');
    } finally {
      await context.close();
    }
  }, 60_000);

  it('When gate C missed, then "expected at Gate C" sits clear of its dip and inside the plot at 1280 and 820 px', async () => {
    const { context, page } = await signInBrowser(app.baseUrl, harness.demo.users.analyst);
    try {
      await page.goto(`${app.baseUrl}/labs/${labId}/shots/${ids.missed}`);
      for (const width of [1280, 820]) {
        await page.setViewportSize({ width, height: 1000 });
        const labels = await pollUntil(async () => {
          const all = await page.locator('.uplot').evaluateAll((roots) => roots.map((r) => (r as HTMLElement).dataset.expectedLabels ?? '[]'));
          const found = all.flatMap((j) => JSON.parse(j) as { text: string; clear: boolean; inside: boolean }[]).filter((l) => l.text.startsWith('expected at Gate C'));
          return found.length > 0 ? found : undefined;
        }, { timeoutMs: 30_000, intervalMs: 200, what: 'the expected label of gate C drawn' });
        expect(labels).toEqual([{ text: 'expected at Gate C (v ± U)', clear: true, inside: true }]);
        // Two gates fired, so no fit: the caption reads without a stray space before its semicolon.
        expect(await page.getByText(/^Dots: gates that fired/).textContent()).toBe('Dots: gates that fired, at their entry instants. Line: the speed; shaded: v ± U.');
        await saveScreenshot(page, `r11-missed-gate-label-${width}`);
      }
    } finally {
      await context.close();
    }
  }, 90_000);

  it('When Sandgate logs a drop, then the form asks only for rig and projectile and no drop shot says "conditions missing"', async () => {
    // A drop as the demo logs them: no tube, so no vacuum; room air logged.
    const sandgate = harness.demo.sandgate;
    if ((await Shot.count({ where: { campaignId: sandgate.campaignIds[0] } })) === 0) {
      await Shot.create({
        labId: harness.demo.labs.sandgate.id, campaignId: sandgate.campaignIds[0], number: 1, projectileId: sandgate.projectileIds[0], gateRigId: sandgate.gateRigIds[0],
        tubePressurePa: null, sealType: '', ambientTemperatureK: 295.15, ambientPressurePa: 100_400, firedAt: new Date('2026-09-01T10:00:00Z'),
      });
    }
    const { context, page } = await signInBrowser(app.baseUrl, harness.demo.users.otherLabAdmin);
    try {
      await page.goto(`${app.baseUrl}/labs/${harness.demo.labs.sandgate.id}/campaigns/${harness.demo.sandgate.campaignIds[0]}`);
      await page.getByRole('table', { name: 'Shots' }).waitFor();
      await page.getByRole('table', { name: 'Shots' }).getByRole('row').nth(1).waitFor();
      expect(await page.getByTestId('conditions-missing').count()).toBe(0);
      await saveScreenshotsAtBothWidths(page, 'r11-sandgate-campaign');
      await page.getByRole('button', { name: 'New shot' }).click();
      const needed = page.getByRole('form', { name: 'New shot' }).getByTestId('needed-conditions');
      await needed.waitFor();
      expect(await needed.textContent()).toBe('This campaign needs: gate rig (gate positions for the speed); projectile (its length and mass, for the single-gate speed and the energy). A shot logged without them is marked “conditions missing” until they are filled in.');
      await saveScreenshotsAtBothWidths(page, 'r11-sandgate-new-shot');
    } finally {
      await context.close();
    }
  }, 60_000);
});
