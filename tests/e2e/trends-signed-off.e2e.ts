// The trends page as a lab lead uses it, in Chromium (issue 11): signed-off shots marked in the plots and the shot
// table and a filter to show only them; statistics per tube-vacuum bin with the note that a spread across a pressure
// sweep is not a repeatability figure; the CSV export's precision choice; and the launcher safety caution beside the
// launcher model, and on the new-campaign and new-shot forms. Screenshots at 1280 and 820 px wide land in
// .test-artifacts/screenshots/ (trends-*.png, new-campaign-form*.png, new-shot-caution*.png); look at them.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Analysis, Campaign, Projectile, Review, Shot } from '../../server/db/models/index.ts';
import { createApiHarness, type ApiHarness } from '../helpers/api-harness.ts';
import { startAppProcesses, type AppProcesses } from '../helpers/app-processes.ts';
import { join } from 'node:path';
import { launchBrowser, saveScreenshotsAtBothWidths, SCREENSHOT_DIR, signInOnPage } from '../helpers/browser.ts';

let harness: ApiHarness;
let app: AppProcesses;
let labId: string;
let campaignId: string;

// number, tube pressure (kPa), speed (m/s), signed off: an invented sweep (demo-like numbers, not measurements)
const SHOTS: [number, number, number, boolean][] = [
  [1, 12, 95.6, false], [2, 8.5, 133.2, true], [3, 6, 162.7, false], [4, 4.2, 185.9, true],
  [5, 3, 203.7, false], [6, 2.1, 218.9, true], [7, 1.5, 230.2, false], [8, 1.1, 238.1, false],
];

beforeAll(async () => {
  harness = await createApiHarness();
  const demo = await harness.resetDatabase();
  labId = demo.labs.hollowmere.id;
  const ball = await Projectile.findOne({ where: { labId, name: 'Table-tennis ball, 40 mm' }, rejectOnEmpty: true });
  campaignId = (await Campaign.create({ labId, name: 'Trends for the lab lead', startedOn: '2026-11-05', tubeLengthM: 2, boreM: 0.0405, createdBy: null })).id;
  for (const [number, kPa, speed, signedOff] of SHOTS) {
    const shot = await Shot.create({ labId, campaignId, number, firedAt: null, projectileId: ball.id, gateRigId: null, tubePressurePa: kPa * 1000, sealType: 'Polyester film, 50 µm', ambientTemperatureK: 293.15, ambientPressurePa: 100_900, createdBy: null });
    const a = await Analysis.create({ labId, shotId: shot.id, version: 1, parameters: {}, engineVersion: 'trends-e2e', jobKey: `trends-e2e-${number}`, requestedBy: null, state: 'done', results: { speed: { value: speed, uncertainty: 0.64, method: 'flight', basis: 'fit', coverage: 2 } } as object });
    await shot.update({ currentAnalysisId: a.id, status: signedOff ? 'approved' : 'analysed', ...(signedOff ? { approvedAnalysisId: a.id } : {}) });
    if (signedOff) await Review.create({ labId, shotId: shot.id, analysisId: a.id, reviewerId: demo.users.reviewer.id, decision: 'approved' });
  }
  app = await startAppProcesses({ env: { GATEPOST_SMTP_PORT: String(harness.smtpPort), GATEPOST_LOG_LEVEL: 'warn' } });
}, 300_000);

afterAll(async () => {
  await app?.stop();
  await harness?.close();
});

describe('trends a lab lead can use', () => {
  it('When the trends page opens, then signed-off shots are marked, can be shown alone, grouped by vacuum bins, and the launcher model has its caution', async () => {
    const context = await launchBrowser();
    try {
      const page = await context.newPage();
      await signInOnPage(page, app.baseUrl, harness.demo.users.reviewer);
      await page.goto(`${app.baseUrl}/labs/${labId}/campaigns/${campaignId}/trends`);
      const table = page.getByRole('table', { name: 'Shots on these plots' });
      await table.waitFor({ timeout: 60_000 });
      // All shots by default, the signed-off ones marked in the table and the legend.
      await expect.poll(() => table.locator('tbody tr').count()).toBe(8);
      expect(await table.locator('tbody tr[data-signed-off="yes"]').count()).toBe(3);
      expect(await table.locator('tbody tr[data-signed-off="yes"] td:first-child').allTextContents()).toEqual(['#2', '#4', '#6']);
      await page.getByTestId('signed-off-legend').waitFor();
      // The caution beside the launcher model, unfolded, saying why it matters here.
      const caution = page.getByTestId('safety-caution');
      await expect(caution.getAttribute('open')).resolves.not.toBeNull();
      await expect(caution.textContent()).resolves.toContain('This model predicts speeds near and above the speed of sound');
      await expect(caution.textContent()).resolves.toContain('Your lab’s rules and trained supervision govern');
      // CSV rounded by default; full precision on request.
      await expect(page.getByTestId('export-csv').getAttribute('href')).resolves.toBe(`/api/labs/${labId}/campaigns/${campaignId}/export?format=csv`);
      await page.getByLabel('CSV numbers').selectOption('full');
      await expect(page.getByTestId('export-csv').getAttribute('href')).resolves.toBe(`/api/labs/${labId}/campaigns/${campaignId}/export?format=csv&precision=full`);

      // Statistics per vacuum bin (1–2–5 steps by default on the page), with the repeatability note.
      await page.getByLabel('Group by').selectOption('vacuum');
      const stats = page.getByRole('table', { name: 'Statistics per group' });
      await expect.poll(() => stats.locator('tbody td:first-child').allTextContents()).toEqual(['1 – 2 kPa', '2 – 5 kPa', '5 – 10 kPa', '10 – 20 kPa']);
      // 1–2 kPa holds 230.2 and 238.1 m/s: mean 234.15 (shown 234.2, half away from zero), SD |238.1 − 230.2|/√2 = 5.586 (two values, worked by hand), SE = SD/√2 = 3.95.
      expect(await stats.locator('tbody tr').first().locator('td').allTextContents()).toEqual(['1 – 2 kPa', '2', '234.2 m/s', '5.6 m/s', '4.0 m/s', '7.9 m/s']);
      await expect(page.getByTestId('not-repeatability').textContent()).resolves.toContain('A spread across a pressure sweep is not a repeatability figure');
      await page.getByTestId('trend-vacuum').locator('canvas').waitFor();
      await page.waitForTimeout(400);
      await saveScreenshotsAtBothWidths(page, 'trends-vacuum-bins');
      // The plot alone, large enough to tell filled (signed off) from hollow markers.
      await page.getByTestId('trend-vacuum').screenshot({ path: join(SCREENSHOT_DIR, 'trends-vacuum-plot.png') });

      // Only the signed-off shots: the table, the statistics and the export links follow.
      await page.getByLabel('Shots', { exact: true }).selectOption('signed-off');
      await expect.poll(() => table.locator('tbody tr').count()).toBe(3);
      await page.getByTestId('signed-off-filter-note').waitFor();
      await expect(page.getByTestId('export-csv').getAttribute('href')).resolves.toBe(`/api/labs/${labId}/campaigns/${campaignId}/export?format=csv&shots=signed-off&precision=full`);
      // Signed off: 2.1 and 4.2 kPa in 2–5 kPa, 8.5 kPa in 5–10 kPa (the 1–2–5 edges follow the shots shown).
      await expect.poll(() => stats.locator('tbody tr').evaluateAll((rows) => rows.map((r) => [r.children[0].textContent, r.children[1].textContent])))
        .toEqual([['2 – 5 kPa', '2'], ['5 – 10 kPa', '1']]);
      await page.waitForTimeout(400);
      await saveScreenshotsAtBothWidths(page, 'trends-signed-off-only');
    } finally {
      await context.close();
    }
  }, 180_000);

  it('When an experimenter opens the new-campaign and new-shot forms, then the launcher safety caution is there', async () => {
    const context = await launchBrowser();
    try {
      const page = await context.newPage();
      await signInOnPage(page, app.baseUrl, harness.demo.users.experimenter);
      await page.getByRole('button', { name: 'New campaign' }).click();
      const caution = page.getByTestId('safety-caution');
      await caution.waitFor();
      await caution.locator('summary').click();
      await expect(caution.textContent()).resolves.toContain('never fire at people');
      await saveScreenshotsAtBothWidths(page, 'new-campaign-form');
      await page.goto(`${app.baseUrl}/labs/${labId}/campaigns/${campaignId}`);
      await page.getByRole('button', { name: 'New shot' }).click();
      const form = page.getByRole('form', { name: 'New shot' });
      await form.getByTestId('safety-caution').locator('summary').click();
      await expect(form.getByTestId('safety-caution').textContent()).resolves.toContain('eye and hearing protection');
      await saveScreenshotsAtBothWidths(page, 'new-shot-caution');
    } finally {
      await context.close();
    }
  }, 120_000);
});
