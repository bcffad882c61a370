// Issue 12, item 10 in the browser: "Forgot password?" to a new password through the mail the fake SMTP server
// received, the account page (change password, sign out everywhere) and a lab admin disabling and enabling a
// member on the People page. Screenshots at 1280 and 820 px go to .test-artifacts/screenshots/accounts-*.
import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PasswordReset } from '../../server/db/models/index.ts';
import { readFakeOutbox } from '../../server/dev/fake-smtp.ts';
import { createApiHarness, type ApiHarness } from '../helpers/api-harness.ts';
import { startAppProcesses, type AppProcesses } from '../helpers/app-processes.ts';
import { launchBrowser, saveScreenshotsAtBothWidths, signInOnPage } from '../helpers/browser.ts';

let harness: ApiHarness;
let app: AppProcesses;
const contexts: BrowserContext[] = [];

beforeAll(async () => {
  harness = await createApiHarness();
  await harness.resetDatabase();
  app = await startAppProcesses({ env: { GATEPOST_SMTP_PORT: String(harness.smtpPort), GATEPOST_LOG_LEVEL: 'warn' }, worker: false });
}, 120_000);

afterAll(async () => {
  for (const c of contexts) await c.close();
  await app?.stop();
  await harness?.close();
});

async function newPage(): Promise<Page> {
  const context = await launchBrowser();
  contexts.push(context);
  return context.newPage();
}

/** The reset mail is sent after the answer; waits until the fake server has it. */
async function resetLinkFor(email: string): Promise<string> {
  for (let i = 0; i < 400; i += 1) {
    const mail = (await readFakeOutbox(harness.redis)).find((m) => m.to.includes(email) && m.subject === 'Set a new Gatepost password');
    if (mail) return /(http\S+\/reset-password#token=[A-Za-z0-9_-]+)/.exec(mail.text)![1];
    await new Promise((resolve) => setTimeout(resolve, 25));
  }
  throw new Error(`no reset mail to ${email}`);
}

describe('accounts in the browser', () => {
  it('When someone forgets their password, then the sign-in page leads to a mailed link that sets a new one, with field messages on the way', async () => {
    const user = harness.demo.users.reviewer;
    const page = await newPage();
    await page.goto(`${app.baseUrl}/sign-in`);
    await page.getByRole('link', { name: 'Forgot password?' }).click();
    await page.waitForURL('**/forgot-password');
    await page.getByRole('button', { name: 'E-mail me a link' }).click();
    await page.getByText('Enter a valid e-mail address.').waitFor();
    await page.getByLabel('E-mail').fill(user.email);
    await page.getByRole('button', { name: 'E-mail me a link' }).click();
    await page.getByRole('status').filter({ hasText: 'If an account uses that address' }).waitFor();
    await saveScreenshotsAtBothWidths(page, 'accounts-forgot-password-sent');

    const link = await resetLinkFor(user.email);
    await page.goto(link);
    // Checked as the page opens: the form says until when the link works.
    await page.getByRole('status').filter({ hasText: /^Your link works until \d{1,2}[:.]\d{2}.*, once\.$/ }).waitFor();
    await page.getByLabel('New password', { exact: true }).fill('short');
    await page.getByLabel('New password again').fill('short');
    await page.getByRole('button', { name: 'Save the new password' }).click();
    await page.getByText('Use at least 10 characters.').waitFor();
    await page.getByLabel('New password', { exact: true }).fill('a reviewer reset password');
    await page.getByLabel('New password again').fill('a reviewer reset passwrod');
    await page.getByRole('button', { name: 'Save the new password' }).click();
    await page.getByText('The two passwords differ.').waitFor();
    await saveScreenshotsAtBothWidths(page, 'accounts-reset-password-errors');
    await page.getByLabel('New password again').fill('a reviewer reset password');
    await page.getByRole('button', { name: 'Save the new password' }).click();
    await page.waitForURL('**/sign-in?reset=done');
    await page.getByText('Your new password is set').waitFor();
    await saveScreenshotsAtBothWidths(page, 'accounts-sign-in-after-reset');
    await signInOnPage(page, app.baseUrl, { email: user.email, password: 'a reviewer reset password' });

    // The same link again (issue 12 review, gap d): said at once, before any password is typed; no form to fill.
    const again = await newPage();
    await again.goto(link);
    await again.getByRole('alert').filter({ hasText: 'This reset link has expired or was already used.' }).waitFor();
    expect(await again.getByLabel('New password', { exact: true }).count()).toBe(0);
    await saveScreenshotsAtBothWidths(again, 'accounts-reset-link-used');
    await again.getByRole('link', { name: 'Ask for a new link' }).click();
    await again.waitForURL('**/forgot-password');
  });

  it('When a reset link has expired, then its page says so as it opens, and a cut-off link is called incomplete', async () => {
    const user = harness.demo.users.experimenter;
    const page = await newPage();
    await page.goto(`${app.baseUrl}/forgot-password`);
    await page.getByLabel('E-mail').fill(user.email);
    await page.getByRole('button', { name: 'E-mail me a link' }).click();
    const link = await resetLinkFor(user.email);
    await PasswordReset.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { userId: user.id } });
    await page.goto(link);
    await page.getByRole('alert').filter({ hasText: 'This reset link has expired or was already used. Ask for a new one' }).waitFor();
    expect(await page.getByRole('button', { name: 'Save the new password' }).count()).toBe(0);
    await page.goto(`${link.slice(0, link.indexOf('#token=') + 12)}`);
    await page.reload();
    await page.getByRole('alert').filter({ hasText: 'This link is incomplete: open it again from the e-mail' }).waitFor();
    await saveScreenshotsAtBothWidths(page, 'accounts-reset-link-incomplete');
  });

  it('When a member changes their password on the account page, then wrong input is named beside its field and another browser of theirs is signed out', async () => {
    const user = harness.demo.users.analyst;
    const other = await newPage();
    await signInOnPage(other, app.baseUrl, user);
    const page = await newPage();
    await signInOnPage(page, app.baseUrl, user);
    await page.getByRole('link', { name: 'Account', exact: true }).click();
    await page.waitForURL('**/account');
    await page.getByLabel('Current password').fill('not my password at all');
    await page.getByLabel('New password', { exact: true }).fill('analyst bench password');
    await page.getByLabel('New password again').fill('analyst bench password');
    await page.getByRole('button', { name: 'Change password' }).click();
    await page.getByText('That is not your current password.').waitFor();
    await saveScreenshotsAtBothWidths(page, 'accounts-change-password-wrong');

    await page.getByLabel('Current password').fill(user.password);
    await page.getByRole('button', { name: 'Change password' }).click();
    await page.getByRole('status').filter({ hasText: 'Password changed.' }).waitFor();
    await saveScreenshotsAtBothWidths(page, 'accounts-change-password-done');
    // This browser goes on; the other one is sent to sign in at its next request.
    await page.reload();
    await page.getByRole('heading', { name: 'Your account' }).waitFor();
    await other.reload();
    await other.waitForURL('**/sign-in**');

    await page.getByRole('button', { name: 'Sign out everywhere' }).click();
    await page.waitForURL('**/sign-in?signed-out=everywhere');
    await page.getByText('You are signed out of every browser.').waitFor();
    await page.goto(`${app.baseUrl}/account`);
    await page.waitForURL('**/sign-in**');
  });

  it('When a lab admin disables a member on the People page, then the member is signed out and refused, and enabling lets them back', async () => {
    const member = harness.demo.users.experimenter;
    const memberPage = await newPage();
    await signInOnPage(memberPage, app.baseUrl, member);

    const admin = await newPage();
    await signInOnPage(admin, app.baseUrl, harness.demo.users.admin);
    await admin.getByRole('navigation', { name: 'Lab sections' }).getByRole('link', { name: 'People' }).click();
    const row = admin.getByRole('listitem').filter({ hasText: member.email });
    await row.getByRole('button', { name: 'Disable…' }).click();
    await admin.getByRole('alertdialog', { name: `Disable ${member.name}` }).waitFor();
    await saveScreenshotsAtBothWidths(admin, 'accounts-people-disable-confirm');
    await admin.getByRole('button', { name: `Disable ${member.name}` }).click();
    await admin.getByRole('status').filter({ hasText: 'is disabled and signed out everywhere' }).waitFor();
    await row.getByText('disabled', { exact: true }).waitFor();
    await saveScreenshotsAtBothWidths(admin, 'accounts-people-disabled');

    await memberPage.reload();
    await memberPage.waitForURL('**/sign-in**');
    await memberPage.getByLabel('E-mail').fill(member.email);
    await memberPage.getByLabel('Password').fill(member.password);
    await memberPage.getByRole('button', { name: 'Sign in' }).click();
    await memberPage.getByText('This account has been disabled by a lab admin.').waitFor();
    await saveScreenshotsAtBothWidths(memberPage, 'accounts-sign-in-disabled');

    await row.getByRole('button', { name: 'Enable' }).click();
    await admin.getByRole('status').filter({ hasText: 'can sign in again' }).waitFor();
    // The message comes with the answer; the list shows the change once it has been fetched again (no reload).
    await expect.poll(() => row.getByText('disabled', { exact: true }).count(), { timeout: 10_000 }).toBe(0);
    await signInOnPage(memberPage, app.baseUrl, member);
  });
});
