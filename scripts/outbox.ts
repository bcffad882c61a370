// `npm run outbox [-- ADDRESS]`: the mail the local stand-in received, newest first, whole (links included), for the
// person who runs `npm start` on this machine. A lab's *Mail outbox* page shows its admins only the mail of their lab,
// without invitation links; mail to one person (a password reset link, a password-change or failed-sign-in notice)
// has no lab and was readable nowhere, so "Forgot password?" on a local install led to a link nobody could open.
// Reading it takes what reading the data folder takes: its Redis password (<data>/redis-password, mode 600).
import { existsSync, readFileSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { Redis } from 'ioredis';
import { readFakeOutbox, type FakeMail } from '../server/dev/fake-smtp.ts';
import { DEFAULT_PORTS, portFromEnv } from './lib/services.ts';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');

/** The mails to `address` (all when empty), newest first, as text a person reads in a terminal. */
export function formatOutbox(mails: FakeMail[], address = ''): string {
  const wanted = address.trim().toLowerCase();
  const chosen = wanted ? mails.filter((m) => m.to.some((to) => to.toLowerCase() === wanted)) : mails;
  if (chosen.length === 0) return wanted ? `No mail to ${address} in the local outbox.` : 'The local outbox is empty.';
  return chosen
    .map((m) => [`--- ${m.receivedAt}  to ${m.to.join(', ')}${m.labId ? `  (lab ${m.labId})` : ''}`, `Subject: ${m.subject}`, '', m.text.trimEnd()].join('\n'))
    .join('\n\n');
}

/** GATEPOST_REDIS_URL when set, else the Redis `npm start` runs for the data folder (same choice as start.ts). */
function redisUrl(): string {
  if (process.env.GATEPOST_REDIS_URL) return process.env.GATEPOST_REDIS_URL;
  const chosen = process.env.GATEPOST_DATA_DIR;
  const candidates = chosen ? [resolve(chosen)] : [join(root, '.data'), `/var/tmp/gatepost-${createHash('sha256').update(root).digest('hex').slice(0, 12)}`];
  const dir = candidates.find((d) => existsSync(join(d, 'redis-password')));
  if (!dir) throw new Error(`no data folder of npm start found (${candidates.join(' or ')}): start it first, or set GATEPOST_DATA_DIR`);
  const password = readFileSync(join(dir, 'redis-password'), 'utf8').trim();
  return `redis://:${encodeURIComponent(password)}@127.0.0.1:${portFromEnv(DEFAULT_PORTS.redis.env, DEFAULT_PORTS.redis.port)}`;
}

async function main(): Promise<void> {
  const redis = new Redis(redisUrl(), { maxRetriesPerRequest: 1, connectTimeout: 3_000, lazyConnect: true });
  redis.on('error', () => undefined);
  try {
    await redis.connect();
    console.log(formatOutbox(await readFakeOutbox(redis), process.argv[2] ?? ''));
  } finally {
    redis.disconnect();
  }
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  main().catch((error: Error) => {
    console.error(`outbox: ${error.message} (is npm start running?)`);
    process.exit(1);
  });
}
