import { Queue } from 'bullmq';
import { QUEUE_NAMES } from '../shared/contracts/jobs.ts';

export const QUEUES = QUEUE_NAMES;

/**
 * Connection options every queue and worker shares. BullMQ needs a real Redis (see ../shared/STACK.md);
 * `maxRetriesPerRequest: null` is what BullMQ requires of a worker connection.
 */
export function redisConnection(url: string) {
  const u = new URL(url);
  return {
    host: u.hostname,
    port: Number(u.port || 6379),
    password: u.password || undefined,
    db: u.pathname.length > 1 ? Number(u.pathname.slice(1)) : 0,
    maxRetriesPerRequest: null,
  };
}

export function createQueue(name: string, redisUrl: string): Queue {
  return new Queue(name, { connection: redisConnection(redisUrl) });
}
