// The demo as `npm start` makes it (issue 11), in Chromium: the demo labs are seeded, the second campaign and second lab
// get their shots (seedDemoMoreShots), every shot's simulated scope file is stored and queued (attachDemoCaptures), a
// real worker reads and analyses them, and the review scene is recorded through the review service once the sweep is
// analysed (recordDemoReviews, which npm start runs beside the app). Then each role finds work waiting: the reviewer
// a shot in the queue, the analyst a returned shot with its comment, the admin the audit entries; the seal comparison
// and Sandgate's drop calibration have shots with speeds. Screenshots (demo-*.png) at 1280 and 820 px; look at them.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Campaign, Shot } from '../../server/db/models/index.ts';
import { attachDemoCaptures } from '../../server/db/seeders/demo-captures.ts';
import { DEMO_REVIEW_SCENE, recordDemoReviews } from '../../server/db/seeders/demo-reviews.ts';
import { demoAccounts, seedDemoMoreShots } from '../../server/db/seeders/demo.ts';
import { LocalDiskStore } from '../../server/storage/local-disk-store.ts';
import { createApiHarness, type ApiHarness } from '../helpers/api-harness.ts';
import { startAppProcesses, type AppProcesses } from '../helpers/app-processes.ts';
import { launchBrowser, saveScreenshotsAtBothWidths, signInOnPage } from '../helpers/browser.ts';

let harness: ApiHarness;
let app: AppProcesses;
let dataDir: string;

beforeAll(async () => {
  harness = await createApiHarness();
  await harness.resetDatabase();
  dataDir = mkdtempSync(join(tmpdir(), 'gatepost-demo-e2e-'));
  expect(await seedDemoMoreShots(harness.sequelize)).toBe(10);
  expect(await attachDemoCaptures({ blobStore: new LocalDiskStore(join(dataDir, 'blobs')), queues: harness.deps.queues, logger: harness.deps.logger })).toBe(18);
  app = await startAppProcesses({ env: { GATEPOST_SMTP_PORT: String(harness.smtpPort), GATEPOST_LOG_LEVEL: 'warn', GATEPOST_DATA_DIR: dataDir } });
  expect(await recordDemoReviews(harness.sequelize, { waitMs: 240_000, pollMs: 500 })).toBe('recorded');
  expect(await recordDemoReviews(harness.sequelize)).toBe('already-recorded');
}, 400_000);

afterAll(async () => {
  await app?.stop();
  await harness?.close();
  if (dataDir) rmSync(dataDir, { recursive: true, force: true });
});

const account = (email: string) => {
  const a = demoAccounts.find((x) => x.email === email)!;
  return { email: a.email, password: a.password };
};

describe('the demo opens with work for every role', () => {
  it('When the demo has been analysed, then shot 3 is signed off, shot 5 returned, shot 7 waiting, with audit entries', async () => {
    const sweep = await Campaign.findOne({ where: { name: 'Vacuum sweep, autumn 2026' }, rejectOnEmpty: true });
    // The scene waits only for shots 3, 5 and 7; the worker may still be on the others: follow it until nothing is
    // pending (a status that never settles fails here after two minutes).
    const statuses = async () => (await Shot.findAll({ where: { campaignId: sweep.id }, order: [['number', 'ASC']] })).map((s) => s.status);
    await expect.poll(statuses, { timeout: 120_000, interval: 500 })
      .toEqual(['analysed', 'analysed', 'approved', 'analysed', 'returned', 'analysed', 'in_review', 'analysed']);
    const actions = (await AuditEvent.findAll({ where: { labId: sweep.labId }, order: [['createdAt', 'ASC'], ['id', 'ASC']] })).map((e) => e.action).filter((a) => a.startsWith('review.'));
    expect(actions).toEqual(['review.requested', 'review.approved', 'review.requested', 'review.returned', 'review.requested']);
    // The other campaign and the other lab: every shot analysed to a speed.
    for (const name of ['Seal comparison', 'Drop calibration']) {
      const c = await Campaign.findOne({ where: { name }, rejectOnEmpty: true });
      const theirs = async () => (await Shot.findAll({ where: { campaignId: c.id } })).map((s) => s.status);
      expect((await theirs()).length, name).toBeGreaterThanOrEqual(4);
      await expect.poll(async () => (await theirs()).every((status) => status === 'analysed'), { timeout: 120_000, interval: 500, message: name }).toBe(true);
    }
  });

  it('When each role signs in, then the reviewer sees the waiting shot, the analyst the returned one, the admin the audit trail', async () => {
    const labId = harness.demo.labs.hollowmere.id;
    const sweep = await Campaign.findOne({ where: { name: 'Vacuum sweep, autumn 2026' }, rejectOnEmpty: true });
    const returned = await Shot.findOne({ where: { campaignId: sweep.id, number: DEMO_REVIEW_SCENE.returned.number }, rejectOnEmpty: true });
    const context = await launchBrowser();
    try {
      const page = await context.newPage();
      await signInOnPage(page, app.baseUrl, account(DEMO_REVIEW_SCENE.reviewer));
      await page.goto(`${app.baseUrl}/labs/${labId}/review-queue`);
      await page.getByText(DEMO_REVIEW_SCENE.waiting.message).waitFor({ timeout: 30_000 });
      await saveScreenshotsAtBothWidths(page, 'demo-review-queue');
      await context.clearCookies();

      await signInOnPage(page, app.baseUrl, account(DEMO_REVIEW_SCENE.returned.by));
      await page.goto(`${app.baseUrl}/labs/${labId}/campaigns/${sweep.id}`);
      await page.getByRole('table').first().waitFor();
      await page.waitForTimeout(500);
      await saveScreenshotsAtBothWidths(page, 'demo-campaign');
      await page.goto(`${app.baseUrl}/labs/${labId}/shots/${returned.id}`);
      await page.getByText(DEMO_REVIEW_SCENE.returned.comment).first().waitFor({ timeout: 30_000 });
      await page.waitForTimeout(800);
      await saveScreenshotsAtBothWidths(page, 'demo-shot-returned');
      await context.clearCookies();

      await signInOnPage(page, app.baseUrl, account('ines.calder@hollowmere.example'));
      await page.goto(`${app.baseUrl}/labs/${labId}/audit`);
      await page.locator('main').locator('li, tr, p').filter({ hasText: 'Marek Vintner' }).first().waitFor({ timeout: 30_000 });
      await saveScreenshotsAtBothWidths(page, 'demo-audit');
      const seals = await Campaign.findOne({ where: { name: 'Seal comparison' }, rejectOnEmpty: true });
      await page.goto(`${app.baseUrl}/labs/${labId}/campaigns/${seals.id}/trends`);
      await page.getByRole('table', { name: 'Statistics per group' }).getByText('Kraft paper, 80 g/m²').waitFor({ timeout: 30_000 });
      await page.waitForTimeout(500);
      await saveScreenshotsAtBothWidths(page, 'demo-seal-trends');
      await context.clearCookies();

      await signInOnPage(page, app.baseUrl, account('sam.whitlow@sandgate.example'));
      const drops = await Campaign.findOne({ where: { name: 'Drop calibration' }, rejectOnEmpty: true });
      await page.goto(`${app.baseUrl}/labs/${drops.labId}/campaigns/${drops.id}`);
      await page.getByText('m/s').first().waitFor({ timeout: 30_000 });
      await page.waitForTimeout(500);
      await saveScreenshotsAtBothWidths(page, 'demo-sandgate-drops');
    } finally {
      await context.close();
    }
  }, 240_000);
});
