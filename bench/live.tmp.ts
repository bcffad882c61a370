import { spawn } from 'node:child_process';
import { chromium } from 'playwright-core';
import { demoAccounts } from '../server/db/seeders/demo.ts';
import { BIG_CAPTURE_SHOT } from './lib/big-capture.ts';
import { signIn } from './lib/pipeline-client.ts';
import { CHROMIUM_ARGS } from '../tests/helpers/browser.ts';

const base = process.env.BASE ?? 'http://127.0.0.1:8751';
const file = '.cache/bench/big-capture-10000000.csv';
const role = (r: string) => demoAccounts.find((a) => a.lab === 'hollowmere' && a.role === r)!;
const admin = await signIn(base, role('admin').email, role('admin').password);
const exp = await signIn(base, role('experimenter').email, role('experimenter').password);
const session = (await exp.get<{ user: { memberships: { labId: string }[] } }>('/api/auth/session')).body;
const labId = session.user.memberships[0].labId;
const campaigns = (await exp.get<{ campaigns: { id: string }[] }>(`/api/labs/${labId}/campaigns`)).body.campaigns;
const projectiles = (await exp.get<{ projectiles: { id: string; name: string }[] }>(`/api/labs/${labId}/projectiles`)).body.projectiles;
const rig = await admin.post<{ gateRig: { id: string } }>(`/api/labs/${labId}/gate-rigs`, {
  name: `Live rig ${Date.now() % 10000}, two gates 0.1 m apart`, beamWidthM: 0.001, sensorType: 'photodiode',
  gates: BIG_CAPTURE_SHOT.gatePositions.map((p, i) => ({ label: String.fromCharCode(65 + i), position_m: p, position_uncertainty_m: 0.0005 })),
});
const shot = await exp.post<{ shot: { id: string } }>(`/api/labs/${labId}/shots`, { campaignId: campaigns[0].id, projectileId: projectiles[0].id, gateRigId: rig.body.gateRig.id });
const shotId = shot.body.shot.id;
console.log('shot', shotId, shot.status);

const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: CHROMIUM_ARGS });
const width = Number(process.env.WIDTH ?? 1280);
const context = await browser.newContext({ viewport: { width, height: 900 } });
const page = await context.newPage();
const problems: string[] = [];
page.on('console', (m) => { if (m.type() === 'error' || m.type() === 'warning') problems.push(`console ${m.type()}: ${m.text()}`); });
page.on('response', (r) => { if (r.url().includes('/window') || r.url().includes('/samples')) console.log('trace response', r.status(), Date.now() % 100000, r.url().slice(-60)); });
const analyst = role('analyst');
await page.goto(`${base}/sign-in`);
await page.getByLabel('E-mail').fill(analyst.email);
await page.getByLabel('Password').fill(analyst.password);
await page.getByRole('button', { name: 'Sign in' }).click();
await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
await page.goto(`${base}/labs/${labId}/shots/${shotId}`);
await page.waitForTimeout(1500);
const t0 = Date.now();
const curl = spawn('curl', ['-sS', '-o', '/dev/null', '-w', '%{http_code}', '-H', `cookie: ${exp.cookie}`, '-F', `files=@${file};type=text/csv;filename=live-deep.csv`, `${base}/api/shots/${shotId}/captures`]);
let code = '';
curl.stdout.on('data', (d) => { code += d; });
await new Promise((r) => curl.on('close', r));
const answered = Date.now();
console.log('upload answered', code, (answered - t0) / 1000, 's');
for (;;) {
  const d = (await exp.get<{ currentAnalysis: { state: string; results: { speed: { value: number; uncertainty: number } } } | null }>(`/api/shots/${shotId}`)).body;
  if (d.currentAnalysis?.state === 'done') {
    console.log('result', (Date.now() - answered) / 1000, 's after answer', d.currentAnalysis.results.speed.value, d.currentAnalysis.results.speed.uncertainty);
    const full = (await exp.get<{ captures: { id: string }[] }>(`/api/shots/${shotId}`)).body;
    const w0 = Date.now();
    const w = await exp.get<{ columns?: unknown[] }>(`/api/captures/${full.captures[0].id}/window?channel=0&points=500`);
    console.log('window right after the result:', w.status, (Date.now() - w0), 'ms', JSON.stringify(w.body).slice(0, 120));
    break;
  }
  await new Promise((r) => setTimeout(r, 20));
}
await page.screenshot({ path: `/tmp/live-${width}-at-result.png`, fullPage: false });
await page.waitForTimeout(4000);
await page.screenshot({ path: `/tmp/live-${width}-after.png`, fullPage: true });
console.log('page text has Analysed:', (await page.content()).includes('Analysed'));
console.log(problems.length ? problems.join('\n') : 'no console warning or error');
await browser.close();
