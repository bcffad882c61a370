// Real scope layouts on the shot page, in Chromium against the real API and worker: a file whose printed times are
// too coarse is read with its grid rebuilt from the stated interval, and the page says how it was read; a file of
// bare sample numbers is refused with a message that asks for the interval, and giving it in "Fix how it is read"
// reads it. One file dropped alone goes up as the request body, named in the URL. Fixtures: fixtures/generate.ts
// (layout families, our own files).
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApiHarness, type ApiHarness } from '../helpers/api-harness.ts';
import { createDemoShotRow } from '../helpers/demo-shots.ts';
import { startAppProcesses, type AppProcesses } from '../helpers/app-processes.ts';
import { launchBrowser, saveScreenshot, signInOnPage } from '../helpers/browser.ts';

const FIXTURES = path.resolve(import.meta.dirname, '../../fixtures/captures');

let harness: ApiHarness;
let app: AppProcesses;
let shotId: string;

beforeAll(async () => {
  harness = await createApiHarness();
  const demo = await harness.resetDatabase();
  shotId = await createDemoShotRow(demo, 102);
  app = await startAppProcesses({ env: { GATEPOST_SMTP_PORT: String(harness.smtpPort), GATEPOST_LOG_LEVEL: 'warn' } });
}, 120_000);

afterAll(async () => {
  await app?.stop();
  await harness?.close();
});

/** The experimenter on a shot's page, its drop zone drawn. */
async function openShotAsExperimenter(browser: Awaited<ReturnType<typeof launchBrowser>>, id: string) {
  const demo = harness.demo;
  const page = await browser.newPage();
  await page.setViewportSize({ width: 1280, height: 900 });
  await signInOnPage(page, app.baseUrl, demo.users.experimenter);
  await page.goto(`${app.baseUrl}/labs/${demo.labs.hollowmere.id}/shots/${id}`);
  await page.getByText('Drop the scope’s CSV exports here').waitFor();
  return page;
}

describe('how a file was read', () => {
  it('When a coarse file and a file of sample numbers are dropped, then the first says its time base was rebuilt and the second is fixed by giving the interval', async () => {
    const browser = await launchBrowser();
    try {
      const page = await openShotAsExperimenter(browser, shotId);
      let numbers = 'Sample,Gate A\n';
      for (let i = 0; i < 400; i++) numbers += `${i},${(Math.sin(i / 11) * 2).toFixed(4)}\n`;
      const files = [
        { name: 'family-03-coarse-printed-times.csv', text: readFileSync(path.join(FIXTURES, 'family-03-coarse-printed-times.csv'), 'latin1') },
        { name: 'bench3-numbers.csv', text: numbers },
      ];
      await page.getByTestId('drop-zone').evaluate((zone, list) => {
        const transfer = new DataTransfer();
        for (const f of list) transfer.items.add(new File([f.text], f.name, { type: 'text/csv' }));
        zone.dispatchEvent(new DragEvent('dragover', { bubbles: true, cancelable: true, dataTransfer: transfer }));
        zone.dispatchEvent(new DragEvent('drop', { bubbles: true, cancelable: true, dataTransfer: transfer }));
      }, files);
      const list = page.getByTestId('capture-list');
      await list.getByText('could not be read').waitFor({ timeout: 120_000 });
      await list.getByText(/the first column counts samples/).first().waitFor();
      await expect.poll(async () => list.getByText('read', { exact: true }).count(), { timeout: 120_000 }).toBe(1);
      const how = list.getByTestId('how-it-was-read').first();
      await how.getByText('How it was read — time base rebuilt, check it').click();
      await how.getByText(/rebuilt from the stated interval: every 200 ns from `Sample interval` \(line 3\)/).waitFor();
      await saveScreenshot(page, 'import-how-read-1280');
      await page.setViewportSize({ width: 820, height: 1100 });
      await saveScreenshot(page, 'import-how-read-820');
      await page.setViewportSize({ width: 1280, height: 900 });

      // The refused file: give its interval in the form and read it again.
      const refusedRow = list.locator('li', { hasText: 'bench3-numbers.csv' });
      await refusedRow.getByRole('button', { name: 'Fix how it is read' }).click();
      await refusedRow.getByLabel('Sample interval (µs)').fill('0.5');
      await saveScreenshot(page, 'import-fix-interval');
      await refusedRow.getByRole('button', { name: 'Read again with these settings' }).click();
      await expect.poll(async () => list.getByText('read', { exact: true }).count(), { timeout: 120_000 }).toBe(2);
      const second = refusedRow.getByTestId('how-it-was-read');
      await second.getByText('How it was read').click();
      await second.getByText(/given by you: every 500 ns from the interval you gave/).waitFor();
      await saveScreenshot(page, 'import-fixed');
    } finally {
      await browser.close();
    }
  }, 400_000);

  it('When one file is dropped, then it goes up as the request body named in the URL, keeps its name and is analysed', async () => {
    const demo = harness.demo;
    const oneShotId = await createDemoShotRow(demo, 103);
    const browser = await launchBrowser();
    try {
      const page = await openShotAsExperimenter(browser, oneShotId);
      const uploads: { url: string; type: string | null }[] = [];
      page.on('request', (r) => {
        if (r.method() === 'POST' && r.url().includes('/captures')) uploads.push({ url: r.url(), type: r.headers()['content-type'] ?? null });
      });
      // A name with letters outside ASCII and spaces, as labs name their files.
      const name = 'Lauf 7 – Schräge, 2 µs.csv';
      const file = { name, text: readFileSync(path.join(FIXTURES, 'plain-time.csv'), 'latin1') };
      await page.getByTestId('drop-zone').evaluate((zone, f) => {
        const transfer = new DataTransfer();
        transfer.items.add(new File([f.text], f.name, { type: 'text/csv' }));
        zone.dispatchEvent(new DragEvent('dragover', { bubbles: true, cancelable: true, dataTransfer: transfer }));
        zone.dispatchEvent(new DragEvent('drop', { bubbles: true, cancelable: true, dataTransfer: transfer }));
      }, file);
      const list = page.getByTestId('capture-list');
      await list.getByText(name).waitFor();
      await expect.poll(async () => list.getByText('read', { exact: true }).count(), { timeout: 120_000 }).toBe(1);
      await page.getByTestId('speed').waitFor({ timeout: 120_000 });
      expect(uploads).toEqual([{ url: `${app.baseUrl}/api/shots/${oneShotId}/captures?fileName=${encodeURIComponent(name)}`, type: 'application/octet-stream' }]);
      await saveScreenshot(page, 'upload-one-file-analysed');
    } finally {
      await browser.close();
    }
  }, 300_000);
});
