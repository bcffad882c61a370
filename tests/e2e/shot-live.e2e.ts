// The shot page follows the server whatever the order of events (issue 11, "states that are always true"):
// 1. a page opened in the gap between "file read" and "analysis created" keeps following until the result is in;
// 2. a bad file dropped beside a good one is a warning on that file, and the shot can still be sent for review;
// 3. the position-time plot draws when the result arrives after the page's first render.
// Each of these failed on the code before issue 11 (the page stayed on "No analysis yet", the shot stayed
// "Processing" without "Send for review", the plot stayed blank until a reload).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BrowserContext, Page } from 'playwright-core';
import { Analysis, Shot } from '../../server/db/models/index.ts';
import { pollUntil, signIn, simulatedCsv, type PipelineClient } from '../../bench/lib/pipeline-client.ts';
import { createApiHarness, type ApiHarness, type DemoWorld } from '../helpers/api-harness.ts';
import { startAppProcesses, type AppProcesses } from '../helpers/app-processes.ts';
import { launchBrowser, saveScreenshot } from '../helpers/browser.ts';
import { logDemoShot } from '../helpers/demo-shots.ts';

let harness: ApiHarness;
let demo: DemoWorld;
let app: AppProcesses;
let experimenter: PipelineClient;
let analyst: PipelineClient;

beforeAll(async () => {
  harness = await createApiHarness();
  demo = await harness.resetDatabase();
  app = await startAppProcesses({ env: { GATEPOST_SMTP_PORT: String(harness.smtpPort), GATEPOST_LOG_LEVEL: 'warn' } });
  experimenter = await signIn(app.baseUrl, demo.users.experimenter.email, demo.users.experimenter.password);
  analyst = await signIn(app.baseUrl, demo.users.analyst.email, demo.users.analyst.password);
}, 120_000);

afterAll(async () => {
  await app?.stop();
  await harness?.close();
});

/** A shot with one simulated three-gate file (300 m/s through the demo rig), read and analysed. */
async function analysedShot(seed: number): Promise<string> {
  const shotId = (await logDemoShot(experimenter, demo)).id;
  await experimenter.upload(shotId, [{ name: 'three-gates.csv', bytes: simulatedCsv({ speed: 300, seed }).bytes }]);
  await pollUntil(async () => ((await experimenter.get<{ shot: { status: string } }>(`/api/shots/${shotId}`)).body.shot.status === 'analysed' ? true : undefined), { timeoutMs: 60_000, what: 'the shot to be analysed' });
  return shotId;
}

async function signedIn(context: BrowserContext, email: string, password: string): Promise<Page> {
  const page = await context.newPage();
  await page.goto(`${app.baseUrl}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL('**/campaigns');
  return page;
}

describe('When the page is open while the server works', () => {
  let browser: BrowserContext;
  let page: Page;
  beforeAll(async () => {
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('then a page opened between "file read" and "analysis created" follows the server until the speed is shown, without a reload', async () => {
    const shotId = await analysedShot(31);
    // Put the shot back into the gap exactly as the worker leaves it for a moment: its file read, no version yet,
    // the shot processing. (The version is removed; the file and its channels stay.)
    const v1 = (await Shot.findByPk(shotId, { rejectOnEmpty: true })).currentAnalysisId!;
    await Shot.update({ currentAnalysisId: null, status: 'processing' }, { where: { id: shotId } });
    await Analysis.destroy({ where: { id: v1 } });

    page = await signedIn(browser, demo.users.analyst.email, demo.users.analyst.password);
    await page.goto(`${app.baseUrl}/labs/${demo.labs.hollowmere.id}/shots/${shotId}`);
    await page.getByText('No analysis yet.').first().waitFor();
    await saveScreenshot(page, 'shot-live-gap');
    // The worker now makes the version (here asked through the API, as a lab script would).
    const made = await analyst.post(`/api/shots/${shotId}/analyses`, {
      parameters: { gates: [{ channel: 'Gate A', position: 0 }, { channel: 'Gate B', position: 0.15 }, { channel: 'Gate C', position: 0.3 }] },
    });
    expect(made.status, JSON.stringify(made.body)).toBe(202);
    await expect.poll(async () => (await page.getByTestId('speed').count()) > 0, { timeout: 20_000 }).toBe(true);
    expect(await page.getByTestId('speed').textContent()).toMatch(/^(29\d|30\d)(\.\d+)? ± /);
  }, 120_000);

  it('then the position-time plot, mounted only once the result arrived, is drawn', async () => {
    const plot = page.getByTestId('position-time');
    await plot.scrollIntoViewIfNeeded();
    await expect.poll(() => plot.locator('canvas').count(), { timeout: 10_000 }).toBe(1);
    const size = await plot.locator('canvas').evaluate((c: HTMLCanvasElement) => [c.width, c.height]);
    expect(size[0]).toBeGreaterThan(100);
    expect(size[1]).toBeGreaterThan(100);
    await saveScreenshot(page, 'shot-live-result');
  });

  it('then a text file renamed .csv dropped on the analysed shot is a warning on that file, and "Send for review" is offered', async () => {
    const shotId = await analysedShot(32);
    const experimenterBrowser = await launchBrowser();
    try {
      const p = await signedIn(experimenterBrowser, demo.users.experimenter.email, demo.users.experimenter.password);
      await p.goto(`${app.baseUrl}/labs/${demo.labs.hollowmere.id}/shots/${shotId}`);
      await p.getByRole('button', { name: 'Send for review' }).waitFor();
      await p.getByTestId('drop-zone').evaluate((zone) => {
        const transfer = new DataTransfer();
        transfer.items.add(new File(['Shopping list\nmilk\neggs\n'], 'renamed-notes.csv', { type: 'text/csv' }));
        zone.dispatchEvent(new DragEvent('dragover', { bubbles: true, cancelable: true, dataTransfer: transfer }));
        zone.dispatchEvent(new DragEvent('drop', { bubbles: true, cancelable: true, dataTransfer: transfer }));
      }, undefined);
      const list = p.getByTestId('capture-list');
      await list.getByText('renamed-notes.csv').waitFor();
      await list.getByText('could not be read').waitFor({ timeout: 30_000 });
      await p.getByRole('button', { name: 'Send for review' }).waitFor({ timeout: 15_000 });
      expect(await p.getByTestId('shot-status').textContent()).toBe('Analysed');
      await saveScreenshot(p, 'shot-live-bad-file');
    } finally {
      await experimenterBrowser.close();
    }
  }, 120_000);
});
