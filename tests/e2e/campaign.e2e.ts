// The campaign page and the library in Debian's Chromium against the real API: the experimenter logs a shot through
// the form (lab units in, SI stored), finds it in the server-sorted, filtered and searched table; the analyst edits
// the library, is refused on a projectile a signed-off shot used, and corrects another one's tolerance. Screenshots
// at a 1280-pixel laptop width and an 820-pixel tablet width go to .test-artifacts/screenshots/ to be looked at.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { Analysis, Campaign, Projectile, Review, Shot } from '../../server/db/models/index.ts';
import { createApiHarness, type ApiHarness, type DemoUser } from '../helpers/api-harness.ts';
import { startAppProcesses, type AppProcesses } from '../helpers/app-processes.ts';
import { launchBrowser, saveScreenshot, signInOnPage } from '../helpers/browser.ts';

let harness: ApiHarness;
let app: AppProcesses;

const LAPTOP = { width: 1280, height: 800 };
const TABLET = { width: 820, height: 1180 };

/**
 * Finished analyses for the first five demo shots (invented speeds of the demo scenario), shot 2 signed off and shot 3
 * sent back, so the table has speeds, methods and decisions to show.
 */
async function seedResults() {
  const demo = harness.demo;
  const speeds = [
    { value: 187.412, uncertainty: 0.3871, method: 'flight', basis: 'fit' },
    { value: 203.95, uncertainty: 0.41, method: 'flight', basis: 'fit' },
    { value: 221.338, uncertainty: 0.962, method: 'flight', basis: 'pair' },
    { value: 236.05, uncertainty: 4.43, method: 'occlusion', basis: 'occlusion' },
    { value: 249.7712, uncertainty: 0.4213, method: 'flight', basis: 'fit' },
  ];
  for (let i = 0; i < speeds.length; i++) {
    const shotId = demo.hollowmere.shotIds[i];
    const analysis = await Analysis.create({
      labId: demo.labs.hollowmere.id, shotId, version: 1, parameters: {}, engineVersion: 'e2e', jobKey: `e2e-${shotId}`, requestedBy: null,
      state: 'done', results: { speed: speeds[i], warnings: [] } as object, completedAt: new Date(),
    });
    const status = i === 1 ? 'approved' : i === 2 ? 'returned' : 'analysed';
    await Shot.update({ currentAnalysisId: analysis.id, status }, { where: { id: shotId } });
    if (i === 1 || i === 2) {
      await Review.create({
        labId: demo.labs.hollowmere.id, shotId, analysisId: analysis.id, reviewerId: demo.users.reviewer.id,
        decision: i === 1 ? 'approved' : 'returned', comment: i === 1 ? '' : 'Gate C pulse looks clipped; check the threshold.',
      });
    }
  }
}

beforeAll(async () => {
  harness = await createApiHarness();
  await harness.resetDatabase();
  await seedResults();
  app = await startAppProcesses({ env: { GATEPOST_SMTP_PORT: String(harness.smtpPort), GATEPOST_LOG_LEVEL: 'warn' } });
}, 120_000);

afterAll(async () => {
  await app?.stop();
  await harness?.close();
});

const signIn = (page: Page, user: DemoUser) => signInOnPage(page, app.baseUrl, user);

const campaignUrl = () => `${app.baseUrl}/labs/${harness.demo.labs.hollowmere.id}/campaigns/${harness.demo.hollowmere.campaignIds[0]}`;
const shotTable = (page: Page) => page.getByRole('table', { name: 'Shots' });
/** Shot numbers of the table's rows, top to bottom. */
const rowNumbers = async (page: Page) =>
  (await shotTable(page).locator('tbody tr td:nth-child(2) a').allTextContents()).map((t) => Number(t.replace('#', '')));
/** Waits until the table shows exactly these shot numbers (the server answers each change). */
async function expectRows(page: Page, expected: number[]) {
  await expect.poll(() => rowNumbers(page), { timeout: 10_000 }).toEqual(expected);
}

describe('campaign page', () => {
  it('When the experimenter logs a shot through the form, then it is stored in SI units and can be found, sorted and filtered in the table', async () => {
    const context = await launchBrowser({ viewport: LAPTOP });
    try {
      const page = await context.newPage();
      await signIn(page, harness.demo.users.experimenter);
      await page.goto(campaignUrl());
      await page.getByRole('heading', { name: 'Vacuum sweep, autumn 2026' }).waitFor();
      // Default order: highest shot number first.
      await expectRows(page, [8, 7, 6, 5, 4, 3, 2, 1]);
      // Speed ± U rounded to the uncertainty (shot 5: 249.7712 ± 0.4213 → 249.77 ± 0.42), with method and decision.
      const row5 = shotTable(page).locator('tbody tr', { hasText: '#5' });
      await expect(row5.textContent()).resolves.toContain('249.77 ± 0.42 m/s');
      await expect(row5.textContent()).resolves.toContain('time of flight, fit');
      await expect(shotTable(page).locator('tbody tr', { hasText: '#2' }).textContent()).resolves.toContain('Signed off');
      await saveScreenshot(page, 'campaign-table-laptop');

      // The form: a bad ambient temperature is refused with the server schema's own message, under its field.
      await page.getByRole('button', { name: 'New shot' }).click();
      const form = page.getByRole('form', { name: 'New shot' });
      await form.waitFor();
      await saveScreenshot(page, 'campaign-new-shot-form-laptop');
      await form.getByLabel('Tube vacuum level').fill('9');
      await form.getByLabel('Unit').selectOption('mbar');
      await form.getByLabel('Ambient temperature (°C)').fill('80');
      await form.getByLabel('Ambient pressure (kPa)').fill('abc');
      await form.getByRole('button', { name: 'Log shot and add files' }).click();
      await form.getByText('Ambient temperature looks wrong (above 60 °C).').waitFor();
      await form.getByText('Enter a number, e.g. 1.5').waitFor();
      await saveScreenshot(page, 'campaign-new-shot-errors-laptop');

      // Seal, projectile and rig came from shot 8; change the seal, fill the rest in lab units.
      const ball = await Projectile.findOne({ where: { name: 'Table-tennis ball, 40 mm' } });
      expect(await form.getByLabel('Projectile').inputValue()).toBe(ball!.id);
      await form.getByLabel('Seal type').fill('Aluminium foil, 20 µm');
      await form.getByLabel('Ambient temperature (°C)').fill('21,5');
      await form.getByLabel('Ambient pressure (kPa)').fill('100.9');
      await form.getByLabel('Fired at').fill('2026-10-15T10:30');
      await form.getByLabel('Notes').fill('First foil seal of the sweep');
      await form.getByRole('button', { name: 'Log shot and add files' }).click();
      await page.waitForURL(/\/labs\/[0-9a-f-]+\/shots\/[0-9a-f-]{36}$/);
      const shotId = page.url().split('/').at(-1)!;
      const stored = await Shot.findByPk(shotId);
      // 9 mbar = 900 Pa (1 mbar = 100 Pa); 21.5 °C = 294.65 K; 100.9 kPa = 100 900 Pa.
      expect(stored).toMatchObject({ number: 9, tubePressurePa: 900, sealType: 'Aluminium foil, 20 µm', ambientPressurePa: 100_900, notes: 'First foil seal of the sweep' });
      expect(stored!.ambientTemperatureK).toBeCloseTo(294.65, 9);
      expect(stored!.projectileId).toBe(ball!.id);
      expect(stored!.gateRigId).not.toBeNull();

      // Back on the campaign: the new shot is listed; search, sort and filter run on the server.
      await page.goto(campaignUrl());
      await expectRows(page, [9, 8, 7, 6, 5, 4, 3, 2, 1]);
      await expect(shotTable(page).locator('tbody tr', { hasText: '#9' }).textContent()).resolves.toContain('0.9 kPa');
      await page.getByLabel('Search notes and seal type').fill('foil');
      await expectRows(page, [9]);
      expect(new URL(page.url()).searchParams.get('q')).toBe('foil');
      await saveScreenshot(page, 'campaign-search-foil-laptop');
      await page.getByRole('button', { name: 'Clear', exact: true }).click();
      await expectRows(page, [9, 8, 7, 6, 5, 4, 3, 2, 1]);
      // The box empties too, and its pending search (debounced 300 ms) does not come back.
      expect(await page.getByLabel('Search notes and seal type').inputValue()).toBe('');
      await page.waitForTimeout(600);
      expect(new URL(page.url()).searchParams.get('q')).toBeNull();

      // Tube pressure, lowest first: 0.9 kPa (shot 9), then the demo sweep 1.1 … 12 kPa (shots 8 … 1).
      await page.getByRole('button', { name: /^Tube/ }).click();
      await expectRows(page, [9, 8, 7, 6, 5, 4, 3, 2, 1]);
      await page.getByRole('button', { name: /^Tube/ }).click();
      await expectRows(page, [1, 2, 3, 4, 5, 6, 7, 8, 9]);
      // Speed, fastest first; shots without a speed last (by number, in the same direction).
      await page.getByRole('button', { name: /^Speed/ }).click();
      await expectRows(page, [5, 4, 3, 2, 1, 9, 8, 7, 6]);
      await saveScreenshot(page, 'campaign-sorted-speed-laptop');
      await page.getByLabel('Status').selectOption('approved');
      await expectRows(page, [2]);
      await saveScreenshot(page, 'campaign-filter-signed-off-laptop');
      await page.getByLabel('Search notes and seal type').fill('no such words');
      await page.getByText('No shots match “no such words” with that status').waitFor();
      await saveScreenshot(page, 'campaign-no-match-laptop');
    } finally {
      await context.close();
    }
  });

  it('When the page is opened on a tablet, then the table and the form fit the width (820 px)', async () => {
    const context = await launchBrowser({ viewport: TABLET });
    try {
      const page = await context.newPage();
      await signIn(page, harness.demo.users.experimenter);
      await page.goto(campaignUrl());
      await shotTable(page).waitFor();
      // Narrow screens fold fired time, seal and review into their neighbours, and offer the order as a menu.
      await page.getByLabel('Sort by').selectOption('speed:desc');
      await expectRows(page, [5, 4, 3, 2, 1, 9, 8, 7, 6]);
      const sideways = await shotTable(page).evaluate((t) => t.scrollWidth - t.parentElement!.clientWidth);
      expect(sideways, 'the shot table scrolls sideways at 820 px').toBeLessThanOrEqual(0);
      await saveScreenshot(page, 'campaign-table-tablet');
      await page.getByRole('button', { name: 'New shot' }).click();
      await page.getByRole('form', { name: 'New shot' }).waitFor();
      await saveScreenshot(page, 'campaign-new-shot-form-tablet');
      // Nothing wider than the window but the table's own scroller.
      const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
      expect(overflow).toBeLessThanOrEqual(0);
    } finally {
      await context.close();
    }
  });

  it('When a campaign has no shots, then the empty table says what to do next', async () => {
    const context = await launchBrowser({ viewport: LAPTOP });
    try {
      const page = await context.newPage();
      await signIn(page, harness.demo.users.experimenter);
      await page.goto(`${app.baseUrl}/labs/${harness.demo.labs.hollowmere.id}/campaigns/${harness.demo.hollowmere.campaignIds[1]}`);
      await page.getByText('No shots in this campaign yet').waitFor();
      await page.getByText('Log the first one with “New shot”').waitFor();
      await saveScreenshot(page, 'campaign-empty-laptop');
    } finally {
      await context.close();
    }
  });
});

describe('campaign pages of shots', () => {
  it('When a campaign has 30 shots, then the table shows 25 and the next page the other 5, from the server', async () => {
    const demo = harness.demo;
    const campaign = await Campaign.create({ labId: demo.labs.hollowmere.id, name: 'Long series', description: 'Thirty shots', startedOn: '2026-11-30', createdBy: null });
    for (let n = 1; n <= 30; n++) {
      await Shot.create({
        labId: demo.labs.hollowmere.id, campaignId: campaign.id, number: n, firedAt: null, projectileId: null, gateRigId: null,
        tubePressurePa: 1000 + n, ambientTemperatureK: null, ambientPressurePa: null, createdBy: null,
      });
    }
    const context = await launchBrowser({ viewport: LAPTOP });
    try {
      const page = await context.newPage();
      await signIn(page, demo.users.reviewer);
      await page.goto(`${app.baseUrl}/labs/${demo.labs.hollowmere.id}/campaigns/${campaign.id}`);
      await page.getByText('Shots 1–25 of 30').waitFor();
      expect((await rowNumbers(page))[0]).toBe(30);
      // A reviewer reads the campaign but does not log shots.
      expect(await page.getByRole('button', { name: 'New shot' }).count()).toBe(0);
      await page.getByRole('button', { name: 'Next' }).click();
      await page.getByText('Shots 26–30 of 30').waitFor();
      await expectRows(page, [5, 4, 3, 2, 1]);
      expect(new URL(page.url()).searchParams.get('page')).toBe('2');
      await saveScreenshot(page, 'campaign-page-2-laptop');
      // A new order starts again at page 1.
      await page.getByRole('button', { name: /^Shot/ }).click();
      await page.getByText('Shots 1–25 of 30').waitFor();
      expect((await rowNumbers(page))[0]).toBe(1);
    } finally {
      await context.close();
    }
  });
});

describe('library', () => {
  it("When the analyst edits projectiles, then a signed-off shot's projectile is refused with a way out, and another one's tolerance is saved", async () => {
    const context = await launchBrowser({ viewport: LAPTOP });
    try {
      const page = await context.newPage();
      await signIn(page, harness.demo.users.analyst);
      await page.getByRole('link', { name: 'Projectiles & rigs' }).click();
      await page.getByRole('heading', { name: 'Projectiles & rigs' }).waitFor();
      await saveScreenshot(page, 'library-analyst-laptop');

      // The 40 mm ball was used by shot 2, which is signed off: its numbers stay.
      await page.getByRole('button', { name: 'Edit Table-tennis ball, 40 mm' }).click();
      const ballForm = page.getByRole('form', { name: 'Edit Table-tennis ball, 40 mm' });
      await ballForm.getByLabel('Mass tolerance (± g)').fill('0.08');
      await ballForm.getByRole('button', { name: 'Save changes' }).click();
      await ballForm.getByRole('alert').filter({ hasText: 'Save your values as a new entry' }).waitFor();
      await saveScreenshot(page, 'library-projectile-locked-laptop');
      await ballForm.getByRole('button', { name: 'Cancel' }).click();

      // The foam sphere has no signed-off shot: its mass tolerance changes from 0.1 g to 0.08 g.
      await page.getByRole('button', { name: 'Edit Foam sphere, 38 mm' }).click();
      const foamForm = page.getByRole('form', { name: 'Edit Foam sphere, 38 mm' });
      expect(await foamForm.getByLabel('Mass tolerance (± g)').inputValue()).toBe('0.1');
      await foamForm.getByLabel('Mass tolerance (± g)').fill('0.08');
      await saveScreenshot(page, 'library-projectile-edit-laptop');
      await foamForm.getByRole('button', { name: 'Save changes' }).click();
      await page.getByText('1.10 g ± 0.08 g').waitFor();
      const foam = await Projectile.findOne({ where: { name: 'Foam sphere, 38 mm' } });
      expect(foam!.massToleranceKg).toBeCloseTo(0.00008, 12);
      const ball = await Projectile.findOne({ where: { name: 'Table-tennis ball, 40 mm' } });
      expect(ball!.massToleranceKg).toBe(0.00005);

      // A new rig: gates out of order are refused under the gate, then reordered and saved.
      await page.getByRole('button', { name: 'Add gate rig' }).click();
      const rigForm = page.getByRole('form', { name: 'New gate rig' });
      await rigForm.getByLabel('Name').fill('Muzzle pair, 100 mm');
      await rigForm.getByRole('listitem', { name: 'Gate 2' }).getByLabel('Position (mm)').fill('100');
      await rigForm.getByRole('button', { name: 'Add gate', exact: true }).click();
      await rigForm.getByRole('listitem', { name: 'Gate 3' }).getByLabel('Position (mm)').fill('50');
      await rigForm.getByRole('button', { name: 'Add gate rig' }).click();
      await rigForm.getByText('Gate 3 (C) must lie further along the path than gate 2 (B)').waitFor();
      await saveScreenshot(page, 'library-rig-order-error-laptop');
      await rigForm.getByRole('button', { name: 'Move gate 3 up' }).click();
      await rigForm.getByRole('listitem', { name: 'Gate 2' }).getByLabel('Label').fill('M');
      await rigForm.getByRole('button', { name: 'Add gate rig' }).click();
      await page.getByText('Muzzle pair, 100 mm').waitFor();
      await page.getByText('Gate M: 50.0 mm ± 0.5 mm').waitFor();
      await saveScreenshot(page, 'library-rig-added-laptop');
    } finally {
      await context.close();
    }
  });

  it('When the experimenter opens the library on a tablet, then it is read-only and says who edits it', async () => {
    const context = await launchBrowser({ viewport: TABLET });
    try {
      const page = await context.newPage();
      await signIn(page, harness.demo.users.experimenter);
      await page.goto(`${app.baseUrl}/labs/${harness.demo.labs.hollowmere.id}/library`);
      await page.getByText('Analysts and lab admins keep the library up to date').waitFor();
      expect(await page.getByRole('button', { name: /^Edit / }).count()).toBe(0);
      expect(await page.getByRole('button', { name: 'Add projectile' }).count()).toBe(0);
      await saveScreenshot(page, 'library-experimenter-tablet');
    } finally {
      await context.close();
    }
  });
});
