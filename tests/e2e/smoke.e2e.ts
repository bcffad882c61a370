// The browser machinery itself: Debian's Chromium starts through playwright-core, loads a page from a local HTTP
// server, runs its script (which fetches from the same server), and a screenshot lands in .test-artifacts/.
import { createServer, type Server } from 'node:http';
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BrowserContext } from 'playwright-core';
import { launchBrowser, saveScreenshot } from '../helpers/browser.ts';

const PAGE = `<!doctype html><html><head><meta charset="utf-8"><title>Gatepost smoke</title></head>
<body style="font-family: sans-serif; padding: 2rem">
  <h1>Gatepost browser smoke test</h1>
  <p>Gate spacing <span id="spacing">0.500</span> m, transit <span id="transit">0.000400</span> s</p>
  <p>Speed: <strong id="speed">not computed</strong></p>
  <p>Server says: <strong id="server">no answer</strong></p>
  <script>
    const metres = Number(document.getElementById('spacing').textContent);
    const seconds = Number(document.getElementById('transit').textContent);
    document.getElementById('speed').textContent = (metres / seconds).toFixed(1) + ' m/s';
    fetch('/answer').then((r) => r.json()).then((body) => { document.getElementById('server').textContent = body.text; });
  </script>
</body></html>`;

describe('Chromium through playwright-core', () => {
  let server: Server;
  let baseUrl: string;
  let browser: BrowserContext;

  beforeAll(async () => {
    server = createServer((request, response) => {
      if (request.url === '/answer') {
        response.writeHead(200, { 'content-type': 'application/json' }).end(JSON.stringify({ text: 'loopback works' }));
      } else {
        response.writeHead(200, { 'content-type': 'text/html; charset=utf-8' }).end(PAGE);
      }
    });
    await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
    const address = server.address();
    baseUrl = `http://127.0.0.1:${typeof address === 'object' && address ? address.port : 0}`;
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
    await new Promise((resolve) => server.close(resolve));
  });

  it('When a page from a local server is loaded, then its script runs and its fetch reaches the server', async () => {
    const page = await browser.newPage();
    await page.goto(baseUrl);
    // 0.500 m / 0.000400 s = 1250 m/s, worked by hand.
    expect(await page.locator('#speed').textContent()).toBe('1250.0 m/s');
    await page.locator('#server', { hasText: 'loopback works' }).waitFor({ timeout: 10_000 });
    expect(await page.title()).toBe('Gatepost smoke');
  });

  it('When a screenshot is saved, then a PNG file of the page exists in .test-artifacts/screenshots', async () => {
    const page = await browser.newPage();
    await page.goto(baseUrl);
    await page.locator('#server', { hasText: 'loopback works' }).waitFor({ timeout: 10_000 });
    const file = await saveScreenshot(page, 'smoke page');
    expect(file).toMatch(/\.test-artifacts\/screenshots\/smoke-page\.png$/);
    const png = readFileSync(file);
    // PNG signature (ISO/IEC 15948, section 5.2) and an IHDR width equal to the 1280-pixel viewport.
    expect([...png.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    expect(png.readUInt32BE(16)).toBe(1280);
  });
});
