// The trends page's launcher model with losses, in Chromium: a campaign whose shots were made from the model with
// known friction (2.5 N) and leak area (1.2 mm²) shows the fitted values with U, the fitted curve with its band on
// the vacuum plot, the residual plot, where the speed goes, the inverse question and the cautions beside them.
// Screenshots at 1280 and 820 px wide land in .test-artifacts/screenshots/ (launcher-fit*.png); look at them.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createRandom } from '../../shared/analysis/create-random.ts';
import { simulateLauncherShot } from '../../shared/physics/simulate-launcher-shot.ts';
import { Analysis, Campaign, Projectile, Shot } from '../../server/db/models/index.ts';
import { createApiHarness, type ApiHarness } from '../helpers/api-harness.ts';
import { startAppProcesses, type AppProcesses } from '../helpers/app-processes.ts';
import { launchBrowser, saveScreenshotsAtBothWidths } from '../helpers/browser.ts';

let harness: ApiHarness;
let app: AppProcesses;
let labId: string;
let campaignId: string;

beforeAll(async () => {
  harness = await createApiHarness();
  const demo = await harness.resetDatabase();
  labId = demo.labs.hollowmere.id;
  const ball = await Projectile.findOne({ where: { labId, name: 'Table-tennis ball, 40 mm' }, rejectOnEmpty: true });
  campaignId = (await Campaign.create({ labId, name: 'Launcher fit on screen', startedOn: '2026-11-05', tubeLengthM: 2, boreM: 0.0405, createdBy: null })).id;
  const random = createRandom(515);
  for (const [i, kPa] of [13, 9, 6.5, 4.8, 3.5, 2.6, 1.9, 1.4, 1].entries()) {
    const speed = simulateLauncherShot({ tubeLength: 2, boreDiameter: 0.0405, projectileDiameter: 0.04, mass: 0.0027, tubePressure: kPa * 1000, ambientPressure: 100_900, ambientTemperature: 293.15, frictionForce: 2.5, leakArea: 1.2e-6 }).exitSpeed + 0.3 * random.normal();
    const shot = await Shot.create({ labId, campaignId, number: i + 1, firedAt: null, projectileId: ball.id, gateRigId: null, tubePressurePa: kPa * 1000, sealType: 'Polyester film', ambientTemperatureK: 293.15, ambientPressurePa: 100_900, createdBy: null });
    const a = await Analysis.create({ labId, shotId: shot.id, version: 1, parameters: {}, engineVersion: 'fit-e2e', jobKey: `fit-e2e-${i}`, requestedBy: null, state: 'done', results: { speed: { value: speed, uncertainty: 0.6, method: 'flight' } } as object });
    await shot.update({ currentAnalysisId: a.id, status: 'analysed' });
  }
  app = await startAppProcesses({ env: { GATEPOST_SMTP_PORT: String(harness.smtpPort), GATEPOST_LOG_LEVEL: 'warn' } });
}, 300_000);

afterAll(async () => {
  await app?.stop();
  await harness?.close();
});


describe('launcher model fitted on the trends page', () => {
  it('When the trends page opens, then the fitted losses, the band, the residuals, the inverse answer and the cautions show', async () => {
    const context = await launchBrowser();
    try {
      const page = await context.newPage();
      const user = harness.demo.users.reviewer;
      await page.goto(`${app.baseUrl}/sign-in`);
      await page.getByLabel('E-mail').fill(user.email);
      await page.getByLabel('Password').fill(user.password);
      await page.getByRole('button', { name: 'Sign in' }).click();
      await page.waitForURL('**/campaigns');
      await page.goto(`${app.baseUrl}/labs/${labId}/campaigns/${campaignId}/trends`);
      const card = page.getByTestId('launcher-fit');
      await card.waitFor({ timeout: 60_000 });
      // Friction and leak printed as value ± U in the lab's words; the truth (2.5 N, 1.2 mm²) inside ± U.
      const friction = /≈ (\d+\.\d+) ± (\d+\.\d+) N/.exec((await page.getByTestId('fit-friction').textContent()) ?? '');
      expect(friction).not.toBeNull();
      expect(Math.abs(Number(friction![1]) - 2.5)).toBeLessThanOrEqual(Number(friction![2]));
      const leak = /≈ (\d+\.\d+) ± (\d+\.\d+) mm²/.exec((await page.getByTestId('fit-leak').textContent()) ?? '');
      expect(leak).not.toBeNull();
      expect(Math.abs(Number(leak![1]) - 1.2)).toBeLessThanOrEqual(Number(leak![2]));
      await expect(page.getByTestId('fit-efficiency').textContent()).resolves.toMatch(/%$/);
      await expect(page.getByTestId('fit-findings').textContent()).resolves.toMatch(/χ²\/ν = \d+\.\d\d/);
      await page.getByTestId('fit-budget').getByText('Zeroth order (full outside pressure all the way)').waitFor();
      await page.getByTestId('trend-residuals').locator('canvas').waitFor();
      await page.getByTestId('trend-vacuum').locator('canvas').waitFor();
      // Cautions beside the plot's predictions and beside the fitted model.
      await expect(page.getByTestId('launcher-cautions-short').textContent()).resolves.toContain('Near-sonic and supersonic projectiles are dangerous');
      await expect(page.getByTestId('launcher-cautions').textContent()).resolves.toContain('not advice to raise pressure, speed or energy');
      // The inverse question, answered in the browser from the fitted model.
      await page.getByLabel('What vacuum for a target speed? (m/s)').fill('200');
      await expect.poll(() => page.getByTestId('inverse-answer').textContent()).toMatch(/For 200\.0 m\/s the fitted model needs the tube at \d+\.\d+ ± \d+\.\d+ kPa/);
      await page.waitForTimeout(500);
      await saveScreenshotsAtBothWidths(page, 'launcher-fit');
      await page.getByLabel('What vacuum for a target speed? (m/s)').fill('900');
      await expect.poll(() => page.getByTestId('inverse-answer').textContent()).toContain('does not reach 900.0 m/s by pumping harder');
      await expect(page.getByTestId('inverse-answer').textContent()).resolves.toContain('Gatepost gives no advice on changing the launcher');
    } finally {
      await context.close();
    }
  }, 180_000);
});
