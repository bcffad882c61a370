import { Redis } from 'ioredis';
import { startFakeSmtp } from '../server/dev/fake-smtp.ts';

/**
 * Development stand-in for the lab's mail relay: `npm start` runs it; admins read its mail in the app. It takes mail
 * only from a client signed in with GATEPOST_SMTP_USER / GATEPOST_SMTP_PASSWORD (start.ts keeps the password in
 * <data>/smtp-password, mode 600, and gives the same pair to the API and the worker).
 */
const port = Number(process.env.GATEPOST_SMTP_PORT ?? 2526);
const user = process.env.GATEPOST_SMTP_USER ?? '';
const password = process.env.GATEPOST_SMTP_PASSWORD ?? '';
if (!user || !password) {
  console.error('GATEPOST_SMTP_USER and GATEPOST_SMTP_PASSWORD must be set: the fake SMTP server takes mail only from the app');
  process.exit(1);
}
const redis = new Redis(process.env.GATEPOST_REDIS_URL ?? 'redis://127.0.0.1:6391', { maxRetriesPerRequest: null });
const server = await startFakeSmtp({ port, redis, credentials: { user, password } });
console.log(`fake SMTP server listening on 127.0.0.1:${server.port} (mail only from a signed-in client); mail is kept for the admin outbox page`);
const stop = async () => {
  await server.close();
  redis.disconnect();
  process.exit(0);
};
process.on('SIGINT', () => void stop());
process.on('SIGTERM', () => void stop());
