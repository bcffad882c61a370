// "Check the time base" in Chromium against the real API and worker (issue 10): a file that writes sample numbers
// under "Time (s)" is read by the worker as 1 s per sample, so the shot model's 300 m/s comes out as 0.00015 m/s.
// The reviewer sees that speed greyed with the reason, the "Check before trusting" box, and an Approve button that
// says why it waits; the analyst confirms the read ("I checked the time base"); then the reviewer can approve.
// Screenshots at 1280×800 and 820 wide go to .test-artifacts/screenshots/ to be looked at.
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { pollUntil, signIn as apiSignIn, type PipelineClient } from '../../bench/lib/pipeline-client.ts';
import { writeCaptureLayout } from '../../fixtures/lib/write-capture-layout.ts';
import { Projectile } from '../../server/db/models/index.ts';
import { simulateShot } from '../../shared/simulate/simulate-shot.ts';
import { createApiHarness, type ApiHarness, type DemoActor } from '../helpers/api-harness.ts';
import { startAppProcesses, type AppProcesses } from '../helpers/app-processes.ts';
import { saveScreenshot, saveScreenshotsAtBothWidths, signInBrowser } from '../helpers/browser.ts';

let harness: ApiHarness;
let app: AppProcesses;
let experimenterApi: PipelineClient;
let labId: string;
let shotId: string;
let campaignId: string;

beforeAll(async () => {
  harness = await createApiHarness();
  const demo = await harness.resetDatabase();
  labId = demo.labs.hollowmere.id;
  app = await startAppProcesses({ env: { GATEPOST_SMTP_PORT: String(harness.smtpPort), GATEPOST_LOG_LEVEL: 'warn' } });
  experimenterApi = await apiSignIn(app.baseUrl, demo.users.experimenter.email, demo.users.experimenter.password);
  const ball = await Projectile.findOne({ where: { labId, name: 'Table-tennis ball, 40 mm' }, rejectOnEmpty: true });
  campaignId = demo.hollowmere.campaignIds[0];
  const created = await experimenterApi.post<{ shot: { id: string } }>(`/api/labs/${labId}/shots`, {
    campaignId, projectileId: ball.id, gateRigId: demo.hollowmere.gateRigIds[0], number: 301,
    tubePressurePa: 2100, sealType: 'Mylar burst disc', ambientTemperatureK: 293.15, ambientPressurePa: 100_900, firedAt: new Date().toISOString(),
  });
  expect(created.status, JSON.stringify(created.body)).toBe(201);
  shotId = created.body.shot.id;
  // The demo rig's gates (0, 0.15, 0.3 m) and ball at 300 m/s, sampled every 200 ns, written with the sample
  // number in the "Time (s)" column: every duration reads 5·10⁶ times too long.
  const shot = simulateShot({
    speed: 300, diameter: 0.04, sampleInterval: 2e-7, length: 8000, t0: -1e-4, arrivalTime: 1e-4, noiseRms: 0.01, responseTime: 1e-6, seed: 11,
    gatePositions: [0, 0.15, 0.3], channelNames: ['Gate A', 'Gate B', 'Gate C'],
  });
  const { bytes } = writeCaptureLayout('plain-time', { t0: 0, dt: 1, channels: shot.channels });
  const up = await experimenterApi.upload(shotId, [{ name: 'sample-numbers-as-seconds.csv', bytes }]);
  expect(up.status, JSON.stringify(up.body)).toBe(202);
  await pollUntil(async () => {
    const d = (await experimenterApi.get<{ shot: { status: string }; currentAnalysis: { state: string } | null }>(`/api/shots/${shotId}`)).body;
    return d.currentAnalysis?.state === 'done' && d.shot.status === 'analysed' ? d : undefined;
  }, { timeoutMs: 120_000, intervalMs: 200, what: 'the shot analysed' });
  const sent = await experimenterApi.post(`/api/shots/${shotId}/review-requests`, { message: 'Slow-roll record; please check.' });
  expect(sent.status, JSON.stringify(sent.body)).toBe(201);
}, 300_000);

afterAll(async () => {
  await app?.stop();
  await harness?.close();
});

/** Signed in as the role, on the shot's page with its result shown. */
async function signedIn(role: Exclude<DemoActor, 'otherLabAdmin'>) {
  const { context, page } = await signInBrowser(app.baseUrl, harness.demo.users[role]);
  await page.goto(`${app.baseUrl}/labs/${labId}/shots/${shotId}`);
  await page.getByTestId('speed').waitFor({ timeout: 60_000 });
  return { context, page };
}

const reviewBar = (page: Page) => page.getByRole('region', { name: 'Review', exact: true });
const approve = (page: Page) => reviewBar(page).getByRole('button', { name: 'Sign off version 1…' });

describe('check the time base', () => {
  it('When the worker reads 1 s per sample, then the speed is greyed with the reason and approval waits until an analyst confirms the read', async () => {
    // 1. The reviewer: greyed speed, the box, and an Approve button that says why it waits.
    {
      const { context, page } = await signedIn('reviewer');
      try {
        const speed = page.getByTestId('speed');
        expect(await speed.getAttribute('data-unchecked')).toBe('true');
        // 300 m/s with durations 5·10⁶ times too long: 0.00006 m/s, stated only as "not a measurement".
        expect(await speed.textContent()).toMatch(/^0\.0000600/);
        // What derives from the speed (Mach number, energy, momentum) is faded with it.
        expect(await page.locator('dl.opacity-50').count()).toBe(1);
        expect(await page.getByTestId('speed-unchecked').textContent()).toMatch(/^Not a measurement until the time base is checked: the speed of 0\.00006 m\/s/);
        const flag = page.getByTestId('time-base-flag');
        await flag.getByText('Check the time base').waitFor();
        await flag.getByText(/the sample interval is 1 s, above 1 ms, yet the gates show pulses/).waitFor();
        expect(await flag.getByRole('button', { name: /I checked the time base/ }).count()).toBe(0);
        await page.getByTestId('assumptions').getByText('± 0.5 mm each (rectangular)').waitFor();
        expect(await approve(page).isDisabled()).toBe(true);
        expect(await reviewBar(page).getByTestId('approval-blocked').textContent()).toMatch(/^Cannot be signed off yet: this version is marked “check the time base”/);
        await saveScreenshotsAtBothWidths(page, 'time-base-unchecked');

        // The campaign's trends leave the unconfirmed speed out, and say so.
        await page.goto(`${app.baseUrl}/labs/${labId}/campaigns/${campaignId}/trends`);
        const note = page.getByTestId('trends-unchecked');
        await note.waitFor({ timeout: 30_000 });
        expect(await note.textContent()).toMatch(/marked “check the time base”: shot 301\.$/);
        await page.getByTestId('trend-vacuum').waitFor();
        await saveScreenshot(page, 'trends-time-base-unchecked');

        // The review queue marks the row.
        await page.goto(`${app.baseUrl}/labs/${labId}/review-queue`);
        await page.getByTestId('queue-time-base').waitFor({ timeout: 30_000 });
        expect(await page.getByTestId('queue-time-base').textContent()).toBe('check the time base');
        await saveScreenshot(page, 'review-queue-time-base');
      } finally {
        await context.close();
      }
    }

    // 2. The analyst says what they checked.
    {
      const { context, page } = await signedIn('analyst');
      try {
        const flag = page.getByTestId('time-base-flag');
        await flag.getByRole('button', { name: 'I checked the time base…' }).click();
        await flag.getByRole('button', { name: 'I checked the time base', exact: true }).click();
        await flag.getByText('Say what you checked: the confirmation needs a note.').waitFor();
        await flag.getByLabel(/What did you check\?/).fill('Slow-roll record at 1 s per point: the scope log confirms it.');
        await saveScreenshot(page, 'time-base-confirm-form');
        await flag.getByRole('button', { name: 'I checked the time base', exact: true }).click();
        await flag.getByText('Time base checked').waitFor();
        await flag.getByText(/“Slow-roll record at 1 s per point: the scope log confirms it\.”/).waitFor();
        expect(await page.getByTestId('speed').getAttribute('data-unchecked')).toBeNull();
        expect(await page.getByTestId('speed-unchecked').count()).toBe(0);
        expect(await page.locator('dl.opacity-50').count()).toBe(0);
        await saveScreenshot(page, 'time-base-confirmed');
      } finally {
        await context.close();
      }
    }

    // 3. The reviewer can now approve.
    {
      const { context, page } = await signedIn('reviewer');
      try {
        expect(await approve(page).isDisabled()).toBe(false);
        expect(await reviewBar(page).getByTestId('approval-blocked').count()).toBe(0);
        await approve(page).click();
        // Signing off asks first, naming the version that is frozen.
        await reviewBar(page).getByRole('group', { name: 'Confirm sign-off' }).getByRole('button', { name: 'Sign off version 1' }).click();
        await page.getByTestId('signed-off').waitFor();
      } finally {
        await context.close();
      }
    }
  });
});
