// Debian's Chromium driven by playwright-core, for the browser tests. Never `npx playwright install`: it downloads
// a browser, and this machine reaches only the npm registry and Debian's packages.
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type BrowserContext, type Page } from 'playwright-core';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '../..');

/** Where saveScreenshot puts its pictures (git-ignored, kept after the run so a person can look at them). */
export const SCREENSHOT_DIR = join(root, '.test-artifacts/screenshots');

/**
 * Flags that worked as root on Debian 12 (see ../shared/STACK.md). Without the background-networking ones Chromium
 * floods the closed network with refused connections.
 */
export const CHROMIUM_ARGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

export interface LaunchBrowserOptions {
  /**
   * Viewport of every page.
   * @default { width: 1280, height: 800 }
   */
  viewport?: { width: number; height: number };
}

/**
 * Launches Chromium with a fresh profile in a temporary folder (so cookies never leak between tests) and returns
 * its context; `context.close()` also deletes the profile. Each call is a separate browser: one per signed-in user.
 */
export async function launchBrowser(options: LaunchBrowserOptions = {}): Promise<BrowserContext> {
  const { viewport = { width: 1280, height: 800 } } = options;
  const profile = mkdtempSync(join(tmpdir(), 'gatepost-chromium-'));
  let context: BrowserContext;
  try {
    context = await chromium.launchPersistentContext(profile, {
      executablePath: process.env.GATEPOST_CHROMIUM ?? '/usr/bin/chromium',
      headless: true,
      args: CHROMIUM_ARGS,
      viewport,
    });
  } catch (error) {
    rmSync(profile, { recursive: true, force: true });
    throw new Error(`could not launch Chromium (${process.env.GATEPOST_CHROMIUM ?? '/usr/bin/chromium'}); run the tests through npm test, which installs it: ${(error as Error).message}`, { cause: error });
  }
  // Removed once close() has resolved: the 'close' event fires while Chromium is still writing to its profile.
  const close = context.close.bind(context);
  context.close = async (...args: Parameters<BrowserContext['close']>) => {
    await close(...args);
    try {
      rmSync(profile, { recursive: true, force: true, maxRetries: 3, retryDelay: 100 });
    } catch {
      // a few kilobytes left in the temporary folder are not worth failing a test over
    }
  };
  return context;
}

/** Saves a full-page screenshot as .test-artifacts/screenshots/NAME.png and returns its path. */
export async function saveScreenshot(page: Page, name: string): Promise<string> {
  const file = join(SCREENSHOT_DIR, `${name.replace(/[^a-zA-Z0-9._-]+/g, '-')}.png`);
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  await page.screenshot({ path: file, fullPage: true });
  return file;
}

/** A full-page screenshot at the laptop size and one at 820 px wide (a tablet held upright, `<name>-820`), then back. */
export async function saveScreenshotsAtBothWidths(page: Page, name: string): Promise<void> {
  await saveScreenshot(page, name);
  await page.setViewportSize({ width: 820, height: 1100 });
  await page.waitForTimeout(400);
  await saveScreenshot(page, `${name}-820`);
  await page.setViewportSize({ width: 1280, height: 800 });
  await page.waitForTimeout(200);
}
