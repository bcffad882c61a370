import { Redis } from 'ioredis';
import { startFakeSmtp } from '../server/dev/fake-smtp.ts';

/** Development stand-in for the lab's mail relay: `npm start` runs it; admins read its mail in the app. */
const port = Number(process.env.GATEPOST_SMTP_PORT ?? 2526);
const redis = new Redis(process.env.GATEPOST_REDIS_URL ?? 'redis://127.0.0.1:6391', { maxRetriesPerRequest: null });
const server = await startFakeSmtp({ port, redis });
console.log(`fake SMTP server listening on 127.0.0.1:${server.port}; mail is kept for the admin outbox page`);
const stop = async () => {
  await server.close();
  redis.disconnect();
  process.exit(0);
};
process.on('SIGINT', () => void stop());
process.on('SIGTERM', () => void stop());
