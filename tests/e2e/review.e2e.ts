// Review in Chromium against the real API and worker: an experimenter sends a shot for review, a reviewer finds it in
// the review queue, compares it with another shot, returns it with a comment; the analyst recomputes; the experimenter
// sends the new version; the reviewer signs it off. Also the trends page (launcher model) and the notification
// settings. Screenshots at 1280×800 and 820 wide go to .test-artifacts/screenshots/ to be looked at.
//
// Shot A: the fixtures per-channel-gate-a/b.csv (fixtures/generate.ts: 312 m/s, gates 100 mm apart) logged with the
// demo rig, whose gates are 150 mm apart: the first result is wrong by 150/100, which is what the reviewer returns.
// Shot B: the shot model at 300 m/s through the demo rig's own gates (bench/lib/pipeline-client.ts `simulatedCsv`).
import { readFileSync } from 'node:fs';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { pollUntil, signIn as apiSignIn, simulatedCsv, type PipelineClient } from '../../bench/lib/pipeline-client.ts';
import { Campaign, Projectile } from '../../server/db/models/index.ts';
import { createApiHarness, type ApiHarness, type DemoActor } from '../helpers/api-harness.ts';
import { startAppProcesses, type AppProcesses } from '../helpers/app-processes.ts';
import { saveScreenshot, saveScreenshotsAtBothWidths, signInBrowser } from '../helpers/browser.ts';

const FIXTURES = path.resolve(import.meta.dirname, '../../fixtures/captures');
const fixture = (name: string) => new Uint8Array(readFileSync(path.join(FIXTURES, name)));

interface ShotView { shot: { id: string; status: string; number: number }; currentAnalysis: { version: number; state: string; results: { speed: { value: number } | null } | null } | null }

let harness: ApiHarness;
let app: AppProcesses;
let experimenterApi: PipelineClient;
let labId: string;
let campaignId: string;
let shotA: string;
let shotB: string;

/** Waits until the shot's current analysis is done and no work is pending; returns the shot. */
async function analysed(shotId: string, version = 1): Promise<ShotView> {
  return pollUntil(async () => {
    const d = (await experimenterApi.get<ShotView>(`/api/shots/${shotId}`)).body;
    return d.currentAnalysis?.state === 'done' && d.currentAnalysis.version >= version && d.shot.status !== 'processing' ? d : undefined;
  }, { timeoutMs: 120_000, intervalMs: 200, what: `shot ${shotId} analysed` });
}

beforeAll(async () => {
  harness = await createApiHarness();
  const demo = await harness.resetDatabase();
  labId = demo.labs.hollowmere.id;
  campaignId = demo.hollowmere.campaignIds[0];
  app = await startAppProcesses({ env: { GATEPOST_SMTP_PORT: String(harness.smtpPort), GATEPOST_LOG_LEVEL: 'warn' } });
  experimenterApi = await apiSignIn(app.baseUrl, demo.users.experimenter.email, demo.users.experimenter.password);
  const ball = await Projectile.findOne({ where: { labId, name: 'Table-tennis ball, 40 mm' }, rejectOnEmpty: true });
  const common = { campaignId, projectileId: ball.id, gateRigId: demo.hollowmere.gateRigIds[0], ambientTemperatureK: 293.15, ambientPressurePa: 100_900 };
  const a = await experimenterApi.post<{ shot: { id: string } }>(`/api/labs/${labId}/shots`, { ...common, number: 201, tubePressurePa: 1800, sealType: 'Mylar burst disc', firedAt: new Date().toISOString() });
  const b = await experimenterApi.post<{ shot: { id: string } }>(`/api/labs/${labId}/shots`, { ...common, number: 202, tubePressurePa: 4200, sealType: 'Packing-tape flap', firedAt: new Date().toISOString() });
  expect(a.status, JSON.stringify(a.body)).toBe(201);
  expect(b.status, JSON.stringify(b.body)).toBe(201);
  shotA = a.body.shot.id;
  shotB = b.body.shot.id;
  const upA = await experimenterApi.upload(shotA, ['per-channel-gate-a.csv', 'per-channel-gate-b.csv'].map((name) => ({ name, bytes: fixture(name) })));
  const upB = await experimenterApi.upload(shotB, [{ name: 'three-gates.csv', bytes: simulatedCsv({ speed: 300, seed: 7 }).bytes }]);
  expect(upA.status, JSON.stringify(upA.body)).toBe(202);
  expect(upB.status, JSON.stringify(upB.body)).toBe(202);
  await Promise.all([analysed(shotA), analysed(shotB)]);
}, 300_000);

afterAll(async () => {
  await app?.stop();
  await harness?.close();
});

const signedIn = (role: Exclude<DemoActor, 'otherLabAdmin'>) => signInBrowser(app.baseUrl, harness.demo.users[role]);
const both = saveScreenshotsAtBothWidths;

const shotUrl = (id: string) => `${app.baseUrl}/labs/${labId}/shots/${id}`;
const reviewBar = (page: Page) => page.getByRole('region', { name: 'Review', exact: true });

describe('review', () => {
  it('When a shot is sent, compared, returned, recomputed, sent again and approved, then each screen shows the step', async () => {
    // 1. The experimenter sends shot A for review with a message; shot B goes through the API.
    {
      const { context, page } = await signedIn('experimenter');
      try {
        await page.goto(shotUrl(shotA));
        await page.getByTestId('speed').waitFor({ timeout: 60_000 });
        await reviewBar(page).getByText('Version 1 not reviewed yet.').waitFor();
        await both(page, 'review-shot-before');
        await reviewBar(page).getByRole('button', { name: 'Send for review' }).click();
        await reviewBar(page).getByLabel(/Message to the reviewers/).fill('First shot with the new burst discs; please check gate B.');
        await saveScreenshot(page, 'review-send-form');
        await reviewBar(page).getByRole('button', { name: 'Send', exact: true }).click();
        await reviewBar(page).getByText('Version 1 is waiting for review').waitFor();
        await reviewBar(page).getByText(/sent v1 for review/).first().waitFor();
        // An experimenter cannot decide.
        expect(await reviewBar(page).getByRole('button', { name: /^Sign off/ }).count()).toBe(0);
        await both(page, 'review-sent');
      } finally {
        await context.close();
      }
      const sendB = await experimenterApi.post(`/api/shots/${shotB}/review-requests`, {});
      expect(sendB.status, JSON.stringify(sendB.body)).toBe(201);
    }

    // 2. The reviewer opens the queue, compares the two shots, and returns shot A with a comment.
    {
      const { context, page } = await signedIn('reviewer');
      try {
        await page.getByRole('navigation', { name: 'Lab sections' }).getByRole('link', { name: 'Review queue' }).click();
        await page.getByRole('heading', { name: 'Review queue' }).waitFor();
        const rows = page.locator('tbody tr');
        await expect.poll(() => rows.count()).toBe(2);
        await page.getByText('First shot with the new burst discs; please check gate B.').waitFor();
        await both(page, 'review-queue');

        await page.getByLabel('Compare shot 201').check();
        await page.getByLabel('Compare shot 202').check();
        await page.getByRole('button', { name: 'Compare 2 shots' }).click();
        await page.waitForURL('**/compare?shots=**');
        await page.getByRole('heading', { name: 'Compare shots' }).waitFor();
        await expect.poll(() => page.getByTestId('compare-column').count()).toBe(2);
        await expect.poll(() => page.getByTestId('compare-plot').count()).toBeGreaterThanOrEqual(4);
        // The two analyses were made with the same defaults but different rigs' mappings: at least one differs.
        const table = page.getByRole('table', { name: 'Analysis parameters' });
        await table.waitFor();
        await page.waitForTimeout(1500);
        await both(page, 'review-compare');

        // Align at another gate, then zoom by dragging across the first overlay: the shared range narrows.
        const align = page.getByLabel('Align at');
        const options = await align.locator('option').allTextContents();
        expect(options[0]).toBe('First gate’s crossing');
        expect(options.length).toBeGreaterThan(1);
        await align.selectOption({ index: options.length - 1 });
        const before = await page.getByTestId('compare-range').textContent();
        const plot = page.getByTestId('compare-plot').first().locator('.u-over');
        const box = (await plot.boundingBox())!;
        await page.mouse.move(box.x + box.width * 0.3, box.y + box.height / 2);
        await page.mouse.down();
        await page.mouse.move(box.x + box.width * 0.6, box.y + box.height / 2, { steps: 5 });
        await page.mouse.up();
        await expect.poll(() => page.getByTestId('compare-range').textContent()).not.toBe(before);
        await page.waitForTimeout(1500);
        await saveScreenshot(page, 'review-compare-zoomed');

        // The wheel over a plot zooms the shared range around the pointer; with the plots focused, → pans and 0 resets
        // to the range the view opened with for this alignment.
        const dragged = await page.getByTestId('compare-range').textContent();
        await page.mouse.move(box.x + box.width * 0.4, box.y + box.height / 2);
        await page.mouse.wheel(0, -240);
        await expect.poll(() => page.getByTestId('compare-range').textContent()).not.toBe(dragged);
        const wheeled = await page.getByTestId('compare-range').textContent();
        await page.getByLabel(/^Plots\. Drag to zoom/).first().focus();
        await page.keyboard.press('ArrowRight');
        await expect.poll(() => page.getByTestId('compare-range').textContent()).not.toBe(wheeled);
        await page.waitForTimeout(1000);
        await saveScreenshot(page, 'review-compare-wheel');
        await page.keyboard.press('0');
        await expect.poll(() => page.getByTestId('compare-range').textContent()).toBe(before);

        await page.goto(shotUrl(shotA));
        // The shot page offers the same comparison with the campaign's other shots.
        await reviewBar(page).getByText('Compare with other shots').click();
        await reviewBar(page).getByRole('group', { name: 'Shots to compare with' }).getByLabel('#202').check();
        expect(await reviewBar(page).getByRole('link', { name: 'Compare 2 shots' }).getAttribute('href')).toBe(`/labs/${labId}/compare?shots=${shotA},${shotB}`);
        await reviewBar(page).getByRole('button', { name: 'Return with comment' }).click();
        // The comment is required.
        await reviewBar(page).getByRole('button', { name: 'Return version 1' }).click();
        await reviewBar(page).getByRole('alert').filter({ hasText: 'a returned shot needs a comment' }).waitFor();
        await saveScreenshot(page, 'review-return-needs-comment');
        await reviewBar(page).getByLabel(/What needs fixing/).fill('Gate B is 100 mm from gate A on this rig, not 150 mm: fix the spacing and recompute.');
        await reviewBar(page).getByRole('button', { name: 'Return version 1' }).click();
        await reviewBar(page).getByText(/^Returned/).waitFor();
        await reviewBar(page).getByText(/returned v1/).first().waitFor();
        // A comment in the thread as well.
        await reviewBar(page).getByLabel('New comment').fill('Shot 202 looks fine for comparison.');
        await reviewBar(page).getByRole('button', { name: 'Post comment' }).click();
        await reviewBar(page).getByText('Shot 202 looks fine for comparison.').waitFor();
        await both(page, 'review-returned');
      } finally {
        await context.close();
      }
    }

    // 3. The analyst fixes the spacing and recomputes: version 2, not reviewed.
    {
      const { context, page } = await signedIn('analyst');
      try {
        await page.goto(shotUrl(shotA));
        await reviewBar(page).getByText(/Gate B is 100 mm from gate A/).first().waitFor();
        await page.getByLabel('Position (mm)').nth(1).fill('100');
        await page.getByRole('button', { name: 'Recompute and keep as a new version' }).click();
        // The "Version 2 queued." note may already be gone: the lab's event stream rebuilds the panel on version 2 as soon as it is done.
        await page.getByTestId('versions').getByText('v2').waitFor({ timeout: 120_000 });
        await expect.poll(async () => (await page.getByTestId('versions').textContent()) ?? '', { timeout: 120_000 }).toMatch(/v2\s*current/);
        await expect.poll(async () => (await page.getByTestId('speed').textContent()) ?? '', { timeout: 30_000 }).toMatch(/^31\d(\.\d+)? ± /);
        await reviewBar(page).getByText('Version 2 not reviewed yet.').waitFor({ timeout: 30_000 });
        await both(page, 'review-recomputed');
      } finally {
        await context.close();
      }
    }

    // 4. The experimenter sends version 2.
    {
      const { context, page } = await signedIn('experimenter');
      try {
        await page.goto(shotUrl(shotA));
        // An answer to the reviewer's comment threads under it.
        await reviewBar(page).getByRole('button', { name: 'Answer' }).click();
        await reviewBar(page).getByLabel(`Answer to ${harness.demo.users.reviewer.name}`).fill('Spacing fixed in version 2.');
        await reviewBar(page).getByRole('button', { name: 'Post answer' }).click();
        await reviewBar(page).getByRole('list', { name: 'Comments' }).locator('ul').getByText('Spacing fixed in version 2.').waitFor();
        await reviewBar(page).getByRole('button', { name: 'Send for review' }).click();
        await reviewBar(page).getByRole('button', { name: 'Send', exact: true }).click();
        await reviewBar(page).getByText('Version 2 is waiting for review').waitFor();
        await both(page, 'review-sent-again');
      } finally {
        await context.close();
      }
    }

    // 5. The reviewer approves version 2: signed off, frozen, out of the queue.
    {
      const { context, page } = await signedIn('reviewer');
      try {
        await page.goto(shotUrl(shotA));
        await reviewBar(page).getByRole('button', { name: 'Sign off version 2…' }).click();
        // The confirmation says which version is frozen.
        const confirm = reviewBar(page).getByRole('group', { name: 'Confirm sign-off' });
        expect(await confirm.textContent()).toContain('Sign off version 2? Its numbers are frozen');
        await confirm.getByRole('button', { name: 'Sign off version 2' }).click();
        await page.getByTestId('signed-off').getByText('Signed off: version 2').waitFor();
        await reviewBar(page).getByText(/signed off v2/).first().waitFor();
        expect(await reviewBar(page).getByRole('link', { name: 'PDF report' }).getAttribute('href')).toBe(`/api/shots/${shotA}/report.pdf`);
        // The export links answer with the formats they promise (content checked by the API tests).
        for (const [name, type] of [['CSV', 'text/csv'], ['JSON', 'application/json'], ['PDF report', 'application/pdf']] as const) {
          const href = await reviewBar(page).getByRole('link', { name, exact: true }).getAttribute('href');
          const res = await page.request.get(`${app.baseUrl}${href}`);
          expect(res.status(), `${name}: ${href}`).toBe(200);
          expect(res.headers()['content-type'], name).toContain(type);
        }
        // The shot's own audit trail (reviewers and admins) records the whole round.
        await reviewBar(page).getByText('Audit trail of this shot').click();
        const audit = reviewBar(page).getByRole('list', { name: 'Audit trail of this shot' });
        // In sentences: "Marek Vintner signed off this shot (version 2)".
        await audit.getByText('Marek Vintner signed off this shot (version 2)').waitFor();
        await audit.getByText(/^Marek Vintner returned this shot \(version 1\)/).waitFor();
        expect(await audit.getByText(/ sent this shot \(version \d\) for review/).count()).toBe(2);
        await both(page, 'review-approved');
        await page.goto(`${app.baseUrl}/labs/${labId}/review-queue`);
        await page.getByRole('heading', { name: 'Review queue' }).waitFor();
        await expect.poll(() => page.locator('tbody tr').count()).toBe(1);
        await saveScreenshot(page, 'review-queue-after');
      } finally {
        await context.close();
      }
    }
    const final = await experimenterApi.get<ShotView>(`/api/shots/${shotA}`);
    expect(final.body.shot.status).toBe('approved');
  }, 600_000);

  it('When the trends page opens, then both plots, the group statistics and the launcher model with its assumptions show', async () => {
    const { context, page } = await signedIn('analyst');
    try {
      await page.goto(`${app.baseUrl}/labs/${labId}/campaigns/${campaignId}`);
      await page.getByRole('link', { name: 'Trends', exact: true }).click();
      await page.waitForURL(`**/campaigns/${campaignId}/trends`);
      await page.getByRole('heading', { name: 'Trends' }).waitFor();
      await page.getByTestId('trend-vacuum').locator('canvas').waitFor();
      await page.getByTestId('trend-number').locator('canvas').waitFor();
      const stats = page.getByRole('table', { name: 'Statistics per group' });
      await stats.getByText('Mylar burst disc').waitFor();
      await stats.getByText('Packing-tape flap').waitFor();
      await page.waitForTimeout(500);
      await saveScreenshot(page, 'trends-by-seal');
      // The campaign's launcher (2 m of 40.5 mm bore, demo seed), the ball's 2.7 g, and the shots' logged outside air
      // (100.9 kPa): √(2·100 900·π·0.02025²·2/0.0027) = 438.8 m/s (worked by hand, Ayars & Buchholtz 2004 zeroth
      // order; see tests/unit/physics/launcher-model.test.ts).
      await expect.poll(() => page.getByLabel('Ball mass (g)').inputValue()).toBe('2.70');
      expect(await page.getByLabel('Tube length (m)').inputValue()).toBe('2');
      expect(await page.getByLabel('Bore (mm)').inputValue()).toBe('40.5');
      expect(await page.getByLabel('Outside air (kPa)').inputValue()).toBe('100.9');
      await expect.poll(() => page.getByTestId('model-summary').textContent()).toContain('438.8 m/s');
      await expect(page.getByTestId('launcher-sources').textContent()).resolves.toContain('Tube length and bore are the campaign’s launcher.');
      // An analyst tries other values but does not change the campaign.
      expect(await page.getByRole('button', { name: /as this campaign’s launcher$/ }).count()).toBe(0);
      await page.getByText('What the curve assumes').waitFor();
      const csvHref = await page.getByRole('link', { name: 'CSV', exact: true }).getAttribute('href');
      const csv = await page.request.get(`${app.baseUrl}${csvHref}`);
      expect(csv.status()).toBe(200);
      expect(csv.headers()['content-type']).toContain('text/csv');
      await page.getByLabel('Tube length (m)').fill('0');
      await page.getByText('The tube length must be greater than 0.').waitFor();
      await page.getByLabel('Tube length (m)').fill('2');
      await page.getByLabel('Group by').selectOption('none');
      await stats.getByText('All shots').waitFor();
      await page.waitForTimeout(500);
      await both(page, 'trends');
    } finally {
      await context.close();
    }
  }, 120_000);

  it('When an experimenter types the launcher of a campaign that has none, then it is kept with the campaign', async () => {
    const { context, page } = await signedIn('experimenter');
    try {
      const sealCampaign = `${app.baseUrl}/labs/${labId}/campaigns/${harness.demo.hollowmere.campaignIds[1]}/trends`;
      await page.goto(sealCampaign);
      await page.getByRole('heading', { name: 'Trends' }).waitFor();
      await page.getByText('This campaign has no launcher logged yet.').waitFor();
      await page.getByText('Enter the tube length.').waitFor();
      await page.getByLabel('Tube length (m)').fill('1,8');
      await page.getByLabel('Bore (mm)').fill('40.6');
      await page.getByLabel('Ball mass (g)').fill('2.7');
      await expect.poll(() => page.getByTestId('launcher-sources').textContent()).toContain('Values typed here are used only on this page.');
      expect(await page.getByTestId('launcher-sources').textContent()).not.toContain('no launcher logged');
      const keep = page.getByRole('button', { name: 'Keep 1.8 m × 40.6 mm as this campaign’s launcher' });
      await both(page, 'trends-launcher-unsaved');
      await keep.click();
      await page.getByRole('status').filter({ hasText: 'Saved with the campaign.' }).waitFor();
      await page.reload();
      await expect.poll(() => page.getByLabel('Tube length (m)').inputValue()).toBe('1.8');
      expect(await page.getByLabel('Bore (mm)').inputValue()).toBe('40.6');
      expect(await keep.count()).toBe(0);
      const row = await Campaign.findByPk(harness.demo.hollowmere.campaignIds[1], { rejectOnEmpty: true });
      expect([row.tubeLengthM, row.boreM]).toEqual([1.8, 0.0406]);

      // A new campaign can log its launcher from the start; the list shows it.
      await page.goto(`${app.baseUrl}/labs/${labId}/campaigns`);
      await page.getByRole('button', { name: 'New campaign' }).click();
      await page.getByLabel('Name').fill('Long tube trial');
      await page.getByLabel('Tube length (m)').fill('3');
      await page.getByLabel('Bore (mm)').fill('4l');
      await page.getByRole('button', { name: 'Create campaign' }).click();
      // The message sits beside the field it is about.
      await page.getByText('“4l” is not a number.').waitFor();
      expect(await page.getByLabel('Bore (mm)').getAttribute('aria-invalid')).toBe('true');
      await page.getByLabel('Bore (mm)').fill('41');
      await saveScreenshot(page, 'campaign-new-with-launcher');
      await page.getByRole('button', { name: 'Create campaign' }).click();
      await page.getByRole('link', { name: /Long tube trial/ }).getByText('tube 3 m, bore 41.0 mm').waitFor();
    } finally {
      await context.close();
    }
  }, 120_000);

  it('When someone turns a kind of e-mail off on the account page, then it stays off', async () => {
    const { context, page } = await signedIn('reviewer');
    try {
      await page.getByRole('link', { name: 'API tokens' }).click();
      const box = page.getByLabel('A shot is sent for review');
      await expect.poll(() => box.isChecked()).toBe(true);
      await box.uncheck();
      await page.getByRole('status').filter({ hasText: 'Saved.' }).waitFor();
      await page.reload();
      await expect.poll(() => page.getByLabel('A shot is sent for review').isChecked()).toBe(false);
      // Each kind is its own switch: the other three stay on.
      for (const other of ['My shot is signed off', 'My shot is returned with a comment', 'Reading a file or an analysis failed']) {
        expect(await page.getByLabel(other).isChecked(), other).toBe(true);
      }
      await both(page, 'notification-settings');
    } finally {
      await context.close();
    }
  }, 60_000);
});
