// Correcting shots in Chromium (issue 11, "shots that can be corrected"): the new-shot form says which conditions
// are needed; a shot logged without ambient temperature is marked "conditions missing" until corrected on its page;
// a wrongly dropped file is removed; a shot logged by mistake is deleted and an admin restores it; two shots are
// ticked in the campaign table and compared. Screenshots at 1280 and 820 px.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BrowserContext, Page } from 'playwright-core';
import { AuditEvent } from '../../server/db/models/index.ts';
import { pollUntil, signIn, simulatedCsv, type PipelineClient } from '../../bench/lib/pipeline-client.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../helpers/api-harness.ts';
import { startAppProcesses, type AppProcesses } from '../helpers/app-processes.ts';
import { launchBrowser, saveScreenshot } from '../helpers/browser.ts';
import { logDemoShot } from '../helpers/demo-shots.ts';

let harness: ApiHarness;
let demo: DemoWorld;
let app: AppProcesses;
let api: PipelineClient;

beforeAll(async () => {
  harness = await createApiHarness();
  demo = await harness.resetDatabase();
  app = await startAppProcesses({ env: { GATEPOST_SMTP_PORT: String(harness.smtpPort), GATEPOST_LOG_LEVEL: 'warn' } });
  api = await signIn(app.baseUrl, demo.users.experimenter.email, demo.users.experimenter.password);
}, 120_000);

afterAll(async () => {
  await app?.stop();
  await harness?.close();
});

async function signedIn(context: BrowserContext, who: 'experimenter' | 'admin'): Promise<Page> {
  const page = await context.newPage();
  await page.goto(`${app.baseUrl}/sign-in`);
  await page.getByLabel('E-mail').fill(demo.users[who].email);
  await page.getByLabel('Password').fill(demo.users[who].password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL('**/campaigns');
  return page;
}

/** Full-page screenshots of the page at 1280 and at 820 px wide. */
async function bothWidths(page: Page, name: string) {
  await page.setViewportSize({ width: 1280, height: 800 });
  await saveScreenshot(page, `${name}-1280`);
  await page.setViewportSize({ width: 820, height: 1000 });
  await saveScreenshot(page, `${name}-820`);
  await page.setViewportSize({ width: 1280, height: 800 });
}

const campaignUrl = () => `${app.baseUrl}/labs/${demo.labs.hollowmere.id}/campaigns/${demo.hollowmere.campaignIds[0]}`;

describe('correcting shots', () => {
  it('When a shot is logged without its ambient temperature, then it is marked and corrected on its page, audited before and after', async () => {
    const browser = await launchBrowser();
    try {
      const page = await signedIn(browser, 'experimenter');
      await page.goto(campaignUrl());
      await page.getByRole('button', { name: 'New shot' }).click();
      const form = page.getByRole('form', { name: 'New shot' });
      await form.getByTestId('needed-conditions').waitFor();
      expect(await form.getByTestId('needed-conditions').textContent()).toContain('ambient temperature (the speed of sound, for the Mach number)');
      await form.getByTestId('safety-caution').waitFor();
      await bothWidths(page, 'new-shot-form');
      await form.getByLabel('Tube vacuum level').fill('1.2');
      await form.getByLabel('Projectile').selectOption({ label: 'Table-tennis ball, 40 mm' });
      await form.getByRole('button', { name: 'Log shot and add files' }).click();
      await page.waitForURL('**/shots/**');
      const shotId = page.url().split('/shots/')[1];
      await page.getByTestId('conditions-missing').waitFor();
      expect(await page.getByTestId('conditions-missing').textContent()).toContain('ambient temperature');

      await page.getByRole('button', { name: 'Correct conditions' }).click();
      const edit = page.getByRole('form', { name: 'Shot conditions' });
      expect(await edit.getByLabel('Tube vacuum level').inputValue()).toBe('1.2');
      await edit.getByLabel('Ambient temperature (°C)').fill('21.5');
      await bothWidths(page, 'shot-correct-conditions');
      await edit.getByRole('button', { name: 'Save conditions' }).click();
      await edit.waitFor({ state: 'detached' });
      const missingNow = page.getByTestId('conditions-missing');
      expect((await missingNow.count()) === 0 ? '' : await missingNow.textContent()).not.toContain('ambient temperature');
      const [event] = await AuditEvent.findAll({ where: { targetId: shotId, action: 'shot.updated' } });
      expect((event.details as { before: Record<string, unknown> }).before).toMatchObject({ ambientTemperatureK: null });
      expect((event.details as { after: Record<string, number> }).after.ambientTemperatureK).toBeCloseTo(294.65, 9);
    } finally {
      await browser.close();
    }
  }, 120_000);

  it('When a wrong file is removed and a mistaken shot deleted, then the file is listed as removed and an admin restores the shot', async () => {
    const made = { body: { shot: await logDemoShot(api, demo, { tubePressurePa: 1500, ambientTemperatureK: 293.15 }) } };
    const shotId = made.body.shot.id;
    await api.upload(shotId, [{ name: 'shot-run.csv', bytes: simulatedCsv({ speed: 300, seed: 41 }).bytes }, { name: 'wrong-shot.csv', bytes: simulatedCsv({ speed: 250, seed: 42 }).bytes }]);
    await pollUntil(async () => ((await api.get<{ shot: { status: string } }>(`/api/shots/${shotId}`)).body.shot.status === 'analysed' ? true : undefined), { timeoutMs: 60_000, what: 'analysed' });
    const browser = await launchBrowser();
    const adminBrowser = await launchBrowser();
    try {
      const page = await signedIn(browser, 'experimenter');
      await page.goto(`${app.baseUrl}/labs/${demo.labs.hollowmere.id}/shots/${shotId}`);
      const list = page.getByTestId('capture-list');
      await list.getByText('wrong-shot.csv').waitFor();
      await list.locator('li', { hasText: 'wrong-shot.csv' }).getByRole('button', { name: 'Remove' }).click();
      await bothWidths(page, 'shot-remove-file');
      await page.getByRole('group', { name: 'Remove wrong-shot.csv' }).getByRole('button', { name: 'Remove file' }).click();
      await page.getByTestId('removed-files').waitFor();
      expect(await page.getByTestId('removed-files').textContent()).toContain('wrong-shot.csv');
      await expect.poll(async () => page.getByTestId('versions').textContent(), { timeout: 60_000 }).toMatch(/v2\s*current/);

      await page.getByRole('button', { name: 'Delete shot…' }).click();
      await page.getByRole('group', { name: 'Delete shot' }).getByRole('button', { name: 'Delete shot' }).click();
      await page.getByTestId('shot-deleted').waitFor();
      await page.goto(campaignUrl());
      await page.getByRole('table', { name: 'Shots' }).waitFor();
      expect(await page.getByRole('link', { name: `#${made.body.shot.number}`, exact: true }).count()).toBe(0);

      const admin = await signedIn(adminBrowser, 'admin');
      await admin.goto(`${app.baseUrl}/labs/${demo.labs.hollowmere.id}/shots/${shotId}`);
      await admin.getByRole('button', { name: 'Restore shot' }).waitFor();
      await bothWidths(admin, 'shot-deleted-admin');
      await admin.getByRole('button', { name: 'Restore shot' }).click();
      await admin.getByTestId('shot-deleted').waitFor({ state: 'detached' });

      // The audit trail tells it in sentences, with the shot as a link, filtered to this shot.
      await admin.goto(`${app.baseUrl}/labs/${demo.labs.hollowmere.id}/audit`);
      await admin.getByLabel('Shot', { exact: true }).selectOption({ label: `#${made.body.shot.number} · Vacuum sweep, autumn 2026` });
      const trail = admin.getByRole('list', { name: 'Audit trail' });
      const sentences = (await trail.locator(':scope > li p').allTextContents()).map((t) => t.replace(/\s+/g, ' ').trim());
      expect(sentences).toContain(`Tomas Reyl deleted shot #${made.body.shot.number} of Vacuum sweep, autumn 2026`);
      expect(sentences).toContain(`Tomas Reyl removed the file wrong-shot.csv from shot #${made.body.shot.number} of Vacuum sweep, autumn 2026`);
      expect(sentences).toContain(`Ines Calder restored shot #${made.body.shot.number} of Vacuum sweep, autumn 2026`);
      await admin.getByLabel('Kind of event').selectOption({ label: 'Files added or removed' });
      await bothWidths(admin, 'audit-filtered');
    } finally {
      await browser.close();
      await adminBrowser.close();
    }
  }, 180_000);

  it('When two shots are ticked in the campaign table, then Compare opens them side by side', async () => {
    const browser = await launchBrowser();
    try {
      const page = await signedIn(browser, 'experimenter');
      await page.goto(campaignUrl());
      const table = page.getByRole('table', { name: 'Shots' });
      await table.waitFor();
      const boxes = table.getByRole('checkbox');
      await boxes.nth(0).check();
      await boxes.nth(1).check();
      await bothWidths(page, 'campaign-table-ticked');
      await page.getByRole('button', { name: 'Compare 2 shots' }).click();
      await page.waitForURL(/\/compare\?shots=[0-9a-f-]+,[0-9a-f-]+$/);
    } finally {
      await browser.close();
    }
  }, 60_000);
});
