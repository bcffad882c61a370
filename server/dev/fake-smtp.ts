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

/**
 * A local SMTP server standing in for the lab's mail relay in development and tests: it accepts every message
 * over plain SMTP on loopback (STARTTLS off: smtp-server's built-in certificate has expired, see
 * ../shared/STACK.md) and keeps it in Redis, where the API shows it to the lab's admins.
 */
export async function startFakeSmtp(options: { host?: string; port: number; redis: Redis }) {
  const { host = '127.0.0.1', port, redis } = options;
  let counter = 0;
  const server = new SMTPServer({
    disabledCommands: ['STARTTLS'],
    authOptional: true,
    logger: false,
    size: 5 * 1024 * 1024,
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
