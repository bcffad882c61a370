// Issue 12, item 13: the production client build carries no source maps, and the server hands out none (a build
// folder of an earlier version may still hold them).
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApiHarness, type ApiHarness } from '../../helpers/api-harness.ts';

let h: ApiHarness;
let clientDir: string;

beforeAll(async () => {
  h = await createApiHarness();
  clientDir = mkdtempSync(path.join(tmpdir(), 'gatepost-client-'));
  mkdirSync(path.join(clientDir, 'assets'));
  writeFileSync(path.join(clientDir, 'index.html'), '<!doctype html><title>Gatepost</title>');
  writeFileSync(path.join(clientDir, 'assets', 'index-abc.js'), 'console.log(1);\n//# sourceMappingURL=index-abc.js.map\n');
  writeFileSync(path.join(clientDir, 'assets', 'index-abc.js.map'), '{"version":3,"sources":["../../src/main.tsx"],"sourcesContent":["secret source"]}');
});
afterAll(async () => {
  await h?.close();
  rmSync(clientDir, { recursive: true, force: true });
});

describe('client files', () => {
  it('When a source map lies in the build folder, then it is not served; the script itself is', async () => {
    const app = h.appWithConfig({ clientDir });
    expect((await request(app).get('/assets/index-abc.js')).status).toBe(200);
    const map = await request(app).get('/assets/index-abc.js.map');
    expect(map.status).toBe(404);
    expect(map.text).not.toContain('secret source');
  });
});
