// Debian's Chromium driven by playwright-core, for the browser tests. Never `npx playwright install`: it downloads
// a browser, and this machine reaches only the npm registry and Debian's packages.
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type BrowserContext, type CDPSession, type Page } from 'playwright-core';

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

/** A new browser signed in through the sign-in page as the given user, on the campaigns page. */
export async function signInBrowser(baseUrl: string, user: { email: string; password: string }): Promise<{ context: BrowserContext; page: Page }> {
  const context = await launchBrowser();
  const page = await context.newPage();
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel('E-mail').fill(user.email);
  await page.getByLabel('Password').fill(user.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL('**/campaigns');
  return { context, page };
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

/** What a page's JavaScript holds after a full garbage collection, from a V8 heap snapshot taken over CDP. */
export interface JsHeapCensus {
  /** JSHeapUsedSize of Performance.getMetrics, bytes: everything, compiled code and browser bookkeeping included. */
  usedBytes: number;
  /** Objects the page's own code can hold on to (objects, arrays, closures, strings, numbers): count and bytes. */
  appObjects: number;
  appBytes: number;
  /** Bytes of page objects by "type:name", for finding what grew. */
  byName: Map<string, number>;
}

/**
 * Counts the page's JavaScript objects after a forced garbage collection. Compiled code (it grows while V8 optimises
 * hot functions, then stops), the resource-timing buffer (capped at 250 entries by the Resource Timing spec) and
 * DevTools' own network records (there only because a test is attached) are left out of `app…`, so a leak of the
 * page's data shows as growth there.
 */
export async function jsHeapCensus(cdp: CDPSession): Promise<JsHeapCensus> {
  await cdp.send('HeapProfiler.enable');
  await cdp.send('HeapProfiler.collectGarbage');
  await cdp.send('Performance.enable');
  const { metrics } = await cdp.send('Performance.getMetrics');
  const usedBytes = metrics.find((m) => m.name === 'JSHeapUsedSize')?.value ?? Number.NaN;
  const chunks: string[] = [];
  const onChunk = (e: { chunk: string }) => chunks.push(e.chunk);
  cdp.on('HeapProfiler.addHeapSnapshotChunk', onChunk);
  await cdp.send('HeapProfiler.takeHeapSnapshot', { reportProgress: false });
  cdp.off('HeapProfiler.addHeapSnapshotChunk', onChunk);
  const snap = JSON.parse(chunks.join('')) as { snapshot: { meta: { node_fields: string[]; node_types: [string[]] } }; nodes: number[]; strings: string[] };
  const fields = snap.snapshot.meta.node_fields;
  const typeNames = snap.snapshot.meta.node_types[0];
  const [typeAt, nameAt, sizeAt, width] = [fields.indexOf('type'), fields.indexOf('name'), fields.indexOf('self_size'), fields.length];
  const appTypes = new Set(['object', 'array', 'closure', 'string', 'concatenated string', 'sliced string', 'number', 'regexp']);
  let appObjects = 0;
  let appBytes = 0;
  const byName = new Map<string, number>();
  for (let i = 0; i < snap.nodes.length; i += width) {
    if (!appTypes.has(typeNames[snap.nodes[i + typeAt]])) continue;
    // V8's own bookkeeping shows as "system / …" names.
    if (String(snap.strings[snap.nodes[i + nameAt]]).startsWith('system /')) continue;
    appObjects += 1;
    appBytes += snap.nodes[i + sizeAt];
    const key = `${typeNames[snap.nodes[i + typeAt]]}:${String(snap.strings[snap.nodes[i + nameAt]]).slice(0, 80)}`;
    byName.set(key, (byName.get(key) ?? 0) + snap.nodes[i + sizeAt]);
  }
  return { usedBytes, appObjects, appBytes, byName };
}

/** Signs a demo user in through the sign-in page and waits for the lab's campaigns. */
export async function signInOnPage(page: Page, baseUrl: string, user: { email: string; password: string }): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel('E-mail').fill(user.email);
  await page.getByLabel('Password').fill(user.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL('**/campaigns');
}
