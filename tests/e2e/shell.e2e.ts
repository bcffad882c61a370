// The client shell in Debian's Chromium against the real API and worker processes: sign-in per role, the
// navigation each role gets, sign-out, an invitation followed from the mail the fake SMTP server received, and
// another lab's pages staying closed. Screenshots go to .test-artifacts/screenshots/ to be looked at.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { readFakeOutbox } from '../../server/dev/fake-smtp.ts';
import { createApiHarness, type ApiHarness, type DemoActor } from '../helpers/api-harness.ts';
import { startAppProcesses, type AppProcesses } from '../helpers/app-processes.ts';
import { launchBrowser, saveScreenshot } from '../helpers/browser.ts';

let harness: ApiHarness;
let app: AppProcesses;

beforeAll(async () => {
  harness = await createApiHarness();
  await harness.resetDatabase();
  // The app processes send mail to the harness's in-process fake SMTP server, which keeps it in the shared Redis.
  app = await startAppProcesses({ env: { GATEPOST_SMTP_PORT: String(harness.smtpPort), GATEPOST_LOG_LEVEL: 'warn' } });
}, 120_000);

afterAll(async () => {
  await app?.stop();
  await harness?.close();
});

/** Written out per role on purpose (not derived from the permission table), so a wrong permission shows here. */
const NAV_BY_ROLE: Record<Exclude<DemoActor, 'otherLabAdmin'>, string[]> = {
  admin: ['Campaigns', 'Review queue', 'Projectiles & rigs', 'People', 'Audit trail', 'Mail outbox'],
  experimenter: ['Campaigns', 'Projectiles & rigs', 'People'],
  analyst: ['Campaigns', 'Projectiles & rigs', 'People'],
  reviewer: ['Campaigns', 'Review queue', 'Projectiles & rigs', 'People', 'Audit trail'],
};

async function signIn(page: Page, email: string, password: string) {
  await page.goto(`${app.baseUrl}/`);
  await page.waitForURL('**/sign-in**');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

// The shell draws its navigation once the session has loaded, which can be after the URL changed: wait for it.
const navLabels = async (page: Page) => {
  const links = page.getByRole('navigation', { name: 'Lab sections' }).getByRole('link');
  await links.first().waitFor();
  return links.allTextContents();
};

describe('client shell', () => {
  it('When sign-out fails (Redis away: 503), then the page says so and stays, instead of pretending the session ended (issue 12, item 11)', async () => {
    const user = harness.demo.users.analyst;
    const context = await launchBrowser();
    try {
      const page = await context.newPage();
      await signIn(page, user.email, user.password);
      await page.waitForURL(`**/labs/${harness.demo.labs.hollowmere.id}/campaigns`);
      // The answer the API gives while Redis is down (tests/api/security/sign-out.test.ts), served to the page.
      await page.route('**/api/auth/logout', (route) => route.fulfill({
        status: 503, contentType: 'application/json',
        body: JSON.stringify({ error: { code: 'service_unavailable', message: 'Sign-out could not be recorded just now, so you are still signed in. Try again in a moment.' } }),
      }));
      await page.getByRole('button', { name: 'Sign out' }).click();
      await page.getByRole('alert').filter({ hasText: 'Sign-out failed' }).waitFor();
      expect(page.url()).toContain('/campaigns');
      await saveScreenshot(page, 'shell-sign-out-failed');
    } finally {
      await context.close();
    }
  }, 60_000);

  for (const role of Object.keys(NAV_BY_ROLE) as (keyof typeof NAV_BY_ROLE)[]) {
    it(`When the ${role} signs in, then they see their lab with the ${role}'s navigation, and sign-out ends the session`, async () => {
      const user = harness.demo.users[role];
      const context = await launchBrowser();
      try {
        const page = await context.newPage();
        await signIn(page, user.email, user.password);
        await page.waitForURL(`**/labs/${harness.demo.labs.hollowmere.id}/campaigns`);
        await page.getByText('Vacuum sweep, autumn 2026').waitFor();
        expect(await navLabels(page)).toEqual(NAV_BY_ROLE[role]);
        await expect(page.getByTestId('signed-in-as').textContent()).resolves.toBe(user.name);
        // Only roles that may start campaigns get the button.
        expect(await page.getByRole('button', { name: 'New campaign' }).count()).toBe(role === 'admin' || role === 'experimenter' ? 1 : 0);
        await saveScreenshot(page, `shell-${role}-campaigns`);

        await page.getByRole('button', { name: 'Sign out' }).click();
        await page.waitForURL('**/sign-in');
        await page.goto(`${app.baseUrl}/labs/${harness.demo.labs.hollowmere.id}/people`);
        await page.waitForURL('**/sign-in?next=**');
        await saveScreenshot(page, `shell-${role}-signed-out`);
      } finally {
        await context.close();
      }
    });
  }

  it('When the password is wrong, then the sign-in page says so and stays', async () => {
    const context = await launchBrowser();
    try {
      const page = await context.newPage();
      await signIn(page, harness.demo.users.analyst.email, 'not-the-password');
      await expect(page.getByRole('alert').textContent()).resolves.toContain('do not match');
      expect(new URL(page.url()).pathname).toBe('/sign-in');
      await saveScreenshot(page, 'shell-sign-in-wrong-password');
    } finally {
      await context.close();
    }
  });

  it('When an admin invites someone, then the mail reaches the outbox and its link signs the new analyst in', async () => {
    const admin = harness.demo.users.admin;
    const labId = harness.demo.labs.hollowmere.id;
    const adminContext = await launchBrowser();
    const guestContext = await launchBrowser();
    try {
      const page = await adminContext.newPage();
      await signIn(page, admin.email, admin.password);
      await page.waitForURL('**/campaigns');
      await page.getByRole('link', { name: 'People' }).click();
      await page.getByLabel('E-mail').fill('noor.halvorsen@hollowmere.example');
      await page.getByLabel('Role', { exact: true }).selectOption('analyst');
      await page.getByRole('button', { name: 'Send invitation' }).click();
      await page.getByRole('status').filter({ hasText: 'Invitation sent' }).waitFor();
      await saveScreenshot(page, 'shell-people-invited');

      await page.getByRole('link', { name: 'Mail outbox' }).click();
      const message = page.locator('li', { hasText: 'invited you to Hollowmere Ballistics Lab' });
      await message.waitFor();
      await saveScreenshot(page, 'shell-outbox');
      // The admin sees that it was sent, not its link (issue 12, item 9); the addressee's mailbox (the fake
      // server's store) holds it.
      expect(await message.locator('pre').textContent()).toContain('/invite/[only the addressee sees this link]');
      const delivered = (await readFakeOutbox(harness.redis)).find((m) => m.to.includes('noor.halvorsen@hollowmere.example'));
      const link = delivered?.text.match(/https?:\/\/\S+\/invite\/\S+/)?.[0];
      expect(link, `no invitation link in:\n${delivered?.text}`).toBeDefined();

      // The mail carries the configured public URL; follow its path on the server under test.
      const guest = await guestContext.newPage();
      await guest.goto(`${app.baseUrl}${new URL(link!).pathname}`);
      await guest.getByRole('heading', { name: 'Join Hollowmere Ballistics Lab' }).waitFor();
      await saveScreenshot(guest, 'shell-invitation');
      await guest.getByLabel('Your name').fill('Noor Halvorsen');
      await guest.getByLabel('Choose a password').fill('bench-notes-2026');
      await guest.getByRole('button', { name: /^Join/ }).click();
      await guest.waitForURL(`**/labs/${labId}/campaigns`);
      expect(await navLabels(guest)).toEqual(NAV_BY_ROLE.analyst);
      await saveScreenshot(guest, 'shell-invitation-accepted');

      // The link works once.
      await guest.goto(`${app.baseUrl}${new URL(link!).pathname}`);
      await expect(guest.getByRole('alert').textContent()).resolves.toContain('already been used');
    } finally {
      await adminContext.close();
      await guestContext.close();
    }
  });

  it("When another lab's admin opens Hollowmere's pages, then they see nothing of it", async () => {
    const other = harness.demo.users.otherLabAdmin;
    const context = await launchBrowser();
    try {
      const page = await context.newPage();
      await signIn(page, other.email, other.password);
      await page.waitForURL(`**/labs/${harness.demo.labs.sandgate.id}/campaigns`);
      await page.getByText('Drop calibration').waitFor();
      await page.goto(`${app.baseUrl}/labs/${harness.demo.labs.hollowmere.id}/campaigns`);
      await page.getByText('not a member of it').waitFor();
      expect(await page.getByText('Vacuum sweep').count()).toBe(0);
      await saveScreenshot(page, 'shell-other-lab-closed');
      await page.goto(`${app.baseUrl}/no/such/page`);
      await page.getByText('There is no page at this address.').waitFor();
      await saveScreenshot(page, 'shell-404');
    } finally {
      await context.close();
    }
  });
});
