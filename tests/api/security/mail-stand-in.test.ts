// Issue 12, item 15: the local stand-in mail server (server/dev/fake-smtp.ts, run by npm start as scripts/fake-smtp.ts
// and in process by the API harness) takes mail only from the app. Another local program, speaking SMTP by hand or
// through nodemailer without the app's sign-in, is refused at MAIL FROM and puts nothing in any lab's outbox; the
// app's mailer signs in with GATEPOST_SMTP_USER / GATEPOST_SMTP_PASSWORD and its mail still arrives.
import { connect } from 'node:net';
import path from 'node:path';
import nodemailer from 'nodemailer';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFakeOutbox } from '../../../server/dev/fake-smtp.ts';
import { createMailer } from '../../../server/lib/mailer.ts';
import { spawnChild, type ChildHandle } from '../../../scripts/lib/processes.ts';
import { createApiHarness, fakeSmtpCredentials, freeLoopbackPort, type ApiHarness, type DemoWorld } from '../../helpers/api-harness.ts';
import { pollUntil } from '../../../bench/lib/pipeline-client.ts';

let h: ApiHarness;
let demo: DemoWorld;

beforeAll(async () => {
  h = await createApiHarness();
  demo = await h.resetDatabase();
});
afterAll(() => h?.close());

/** Speaks SMTP by hand on 127.0.0.1:port, as any local program could: each command's reply line, in order. */
function smtpByHand(port: number, commands: string[]): Promise<string[]> {
  return new Promise((resolve, reject) => {
    const replies: string[] = [];
    let buffered = '';
    let sent = 0;
    const socket = connect(port, '127.0.0.1');
    socket.setTimeout(10_000, () => socket.destroy(new Error(`no answer after ${replies.length} replies`)));
    socket.on('data', (chunk) => {
      buffered += chunk.toString();
      // A reply ends with a line "NNN text" (a space after the code); "NNN-" lines continue it.
      let end: RegExpExecArray | null;
      while ((end = /^\d{3} .*\r\n/m.exec(buffered))) {
        replies.push(end[0].trim());
        buffered = buffered.slice(end.index + end[0].length);
        if (sent < commands.length) socket.write(`${commands[sent++]}\r\n`);
        else {
          socket.end();
          resolve(replies);
        }
      }
    });
    socket.on('error', reject);
  });
}

const messageFrom = (port: number, auth?: { user: string; pass: string }) => nodemailer.createTransport({
  host: '127.0.0.1', port, secure: false, ignoreTLS: true, auth, connectionTimeout: 5_000, greetingTimeout: 5_000,
});

const forged = (to: string) => ({
  from: 'lab-admin@hollowmere.example',
  to,
  subject: 'Your invitation to Hollowmere',
  text: 'Accept here: http://evil.example/invite/take-over',
  headers: { 'X-Gatepost-Lab': '' },
});

async function outboxFor(email: string) {
  return (await readFakeOutbox(h.redis)).filter((m) => m.to.includes(email));
}

describe('the stand-in mail server of the API tests', () => {
  it('When a local program sends MAIL FROM without signing in, then it gets 530 and nothing lands in the outbox', async () => {
    const to = 'raw.socket@elsewhere.example';
    const replies = await smtpByHand(h.smtpPort, [
      'EHLO intruder.local', 'MAIL FROM:<lab-admin@hollowmere.example>', `RCPT TO:<${to}>`, 'DATA', 'QUIT',
    ]);
    expect(replies[0]).toMatch(/^220 /);
    expect(replies[1]).toMatch(/^250 /);
    expect(replies[2]).toMatch(/^530 .*[Aa]uthentication [Rr]equired/);
    expect(replies[3]).toMatch(/^5\d\d /);
    expect(replies[4]).toMatch(/^5\d\d /);
    expect(await outboxFor(to)).toEqual([]);
  });

  it('When nodemailer sends without the app\'s sign-in, or with a wrong password, then it is refused (530, 535)', async () => {
    const to = 'nodemailer.intruder@elsewhere.example';
    const bare = messageFrom(h.smtpPort);
    await expect(bare.sendMail({ ...forged(to), headers: { 'X-Gatepost-Lab': demo.labs.hollowmere.id } })).rejects.toMatchObject({ responseCode: 530 });
    bare.close();
    const guessing = messageFrom(h.smtpPort, { user: 'gatepost', pass: 'hollowmere-demo-password' });
    await expect(guessing.sendMail(forged(to))).rejects.toMatchObject({ responseCode: 535 });
    guessing.close();
    const { password } = fakeSmtpCredentials();
    const wrongUser = messageFrom(h.smtpPort, { user: 'admin', pass: password });
    await expect(wrongUser.sendMail(forged(to))).rejects.toMatchObject({ responseCode: 535 });
    wrongUser.close();
    expect(await outboxFor(to)).toEqual([]);
    const shown = await request(h.app).get(`/api/labs/${demo.labs.hollowmere.id}/outbox`).set('Cookie', h.sessionCookie(demo.users.admin.id));
    expect(shown.status).toBe(200);
    expect(JSON.stringify(shown.body)).not.toContain(to);
  });

  it('When the app sends an invitation, then its mailer signs in and the mail arrives in the lab\'s outbox', async () => {
    const email = 'welcome.aboard@elsewhere.example';
    const sent = await request(h.app).post(`/api/labs/${demo.labs.hollowmere.id}/invitations`)
      .set('Cookie', h.sessionCookie(demo.users.admin.id)).send({ email, role: 'analyst' });
    expect(sent.status, JSON.stringify(sent.body)).toBe(201);
    const [mail] = await outboxFor(email);
    expect(mail.labId).toBe(demo.labs.hollowmere.id);
    expect(mail.text).toMatch(/\/invite\/[A-Za-z0-9_-]+/);
  });
});

describe('the stand-in mail server npm start runs (scripts/fake-smtp.ts)', () => {
  let child: ChildHandle | null = null;
  afterAll(async () => {
    await child?.stop();
  });
  const tsx = path.resolve('node_modules/.bin/tsx');

  it('When it is started without the app\'s user name and password, then it refuses to start', async () => {
    const env = { ...process.env, GATEPOST_SMTP_PORT: String(await freeLoopbackPort()), GATEPOST_SMTP_USER: '', GATEPOST_SMTP_PASSWORD: '' };
    const bare = spawnChild({ name: 'smtp', command: tsx, args: ['scripts/fake-smtp.ts'], env, cwd: process.cwd(), echo: false });
    const status = await bare.exited;
    expect(status.code).toBe(1);
    expect(bare.output()).toContain('GATEPOST_SMTP_USER and GATEPOST_SMTP_PASSWORD must be set');
  });

  it('When it runs, then a stranger is refused and the app\'s mailer (the config npm start gives it) gets through', async () => {
    const port = await freeLoopbackPort();
    const { user, password } = fakeSmtpCredentials();
    const env = { ...process.env, GATEPOST_REDIS_URL: h.config.redisUrl, GATEPOST_SMTP_PORT: String(port), GATEPOST_SMTP_USER: user, GATEPOST_SMTP_PASSWORD: password };
    child = spawnChild({ name: 'smtp', command: tsx, args: ['scripts/fake-smtp.ts'], env, cwd: process.cwd(), echo: false });
    await pollUntil(async () => (child!.output().includes('listening') ? true : child!.hasExited() ? Promise.reject(new Error(child!.output())) : undefined),
      { timeoutMs: 30_000, what: 'the fake SMTP server to listen' });
    const to = 'script.intruder@elsewhere.example';
    const stranger = messageFrom(port);
    await expect(stranger.sendMail(forged(to))).rejects.toMatchObject({ responseCode: 530 });
    stranger.close();
    expect(await outboxFor(to)).toEqual([]);

    const mailer = createMailer({ ...h.config, smtpPort: port, smtpUser: user, smtpPassword: password });
    await mailer.send({ to: 'from.the.app@elsewhere.example', subject: 'Sent by the app', text: 'hello', labId: demo.labs.hollowmere.id });
    mailer.close();
    const [arrived] = await outboxFor('from.the.app@elsewhere.example');
    expect(arrived).toMatchObject({ subject: 'Sent by the app', labId: demo.labs.hollowmere.id });
  });
});
