import { timingSafeEqual } from 'node:crypto';
import { SMTPServer } from 'smtp-server';
import { simpleParser } from 'mailparser';
import type { Redis } from 'ioredis';

/** Where the fake server keeps what it received: a capped Redis list, newest first. */
export const FAKE_OUTBOX_KEY = 'gp:fake-outbox';
const KEEP = 500;

export interface FakeMail {
  id: string;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  labId: string | null;
}

/** The user name and password the app's mailer signs in with (GATEPOST_SMTP_USER, GATEPOST_SMTP_PASSWORD). */
export interface FakeSmtpCredentials {
  user: string;
  password: string;
}

function sameSecret(given: string, expected: string): boolean {
  const a = Buffer.from(given);
  const b = Buffer.from(expected);
  return a.length === b.length && timingSafeEqual(a, b);
}

/**
 * A local SMTP server standing in for the lab's mail relay in development and tests: it takes mail only from a
 * client that signed in (SMTP AUTH PLAIN or LOGIN) with `credentials`, i.e. from the app, whose mailer gets them as
 * GATEPOST_SMTP_USER / GATEPOST_SMTP_PASSWORD; any other local program gets 530 at MAIL FROM and cannot write into
 * a lab's outbox. Plain SMTP on loopback (STARTTLS off: smtp-server's built-in certificate has expired, see
 * ../shared/STACK.md). What it receives is kept in Redis, where the API shows it to the lab's admins.
 */
export async function startFakeSmtp(options: { host?: string; port: number; redis: Redis; credentials: FakeSmtpCredentials }) {
  const { host = '127.0.0.1', port, redis, credentials } = options;
  if (!credentials.user || credentials.password.length < 16) {
    throw new Error('the fake SMTP server needs a user name and a generated password of 16 or more characters (GATEPOST_SMTP_USER, GATEPOST_SMTP_PASSWORD)');
  }
  let counter = 0;
  const server = new SMTPServer({
    disabledCommands: ['STARTTLS'],
    // Every message needs a signed-in session: MAIL FROM before AUTH is refused with 530.
    authOptional: false,
    authMethods: ['PLAIN', 'LOGIN'],
    // Loopback only, and the secret is the app's, so AUTH without TLS is what we want here.
    allowInsecureAuth: true,
    logger: false,
    size: 5 * 1024 * 1024,
    onAuth(auth, _session, callback) {
      const ok = auth.method !== 'XOAUTH2' && sameSecret(auth.username ?? '', credentials.user) && sameSecret(auth.password ?? '', credentials.password);
      if (!ok) {
        callback(Object.assign(new Error('Authentication failed: wrong user name or password'), { responseCode: 535 }));
        return;
      }
      callback(null, { user: credentials.user });
    },
    onMailFrom(_address, session, callback) {
      // authOptional: false already says 530 here; this keeps the rule if that option ever changes.
      if (!session.user) {
        callback(Object.assign(new Error('Authentication required: only the Gatepost app may send through this server'), { responseCode: 530 }));
        return;
      }
      callback();
    },
    onData(stream, session, callback) {
      simpleParser(stream)
        .then(async (parsed) => {
          const mail: FakeMail = {
            id: `${Date.now().toString(36)}-${(counter++).toString(36)}`,
            receivedAt: new Date().toISOString(),
            from: parsed.from?.text ?? String(session.envelope.mailFrom && session.envelope.mailFrom.address),
            to: session.envelope.rcptTo.map((r) => r.address),
            subject: parsed.subject ?? '',
            text: parsed.text ?? '',
            labId: (parsed.headers.get('x-gatepost-lab') as string | undefined) ?? null,
          };
          await redis.multi().lpush(FAKE_OUTBOX_KEY, JSON.stringify(mail)).ltrim(FAKE_OUTBOX_KEY, 0, KEEP - 1).exec();
          callback();
        })
        .catch((err: Error) => callback(err));
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, host, () => resolve());
  });
  return {
    port: (server.server.address() as { port: number }).port,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

export async function readFakeOutbox(redis: Redis, limit = KEEP): Promise<FakeMail[]> {
  const raw = await redis.lrange(FAKE_OUTBOX_KEY, 0, limit - 1);
  return raw.map((r) => JSON.parse(r) as FakeMail);
}
