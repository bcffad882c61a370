import { redisEndpoint } from '../server/lib/redis.ts';

/**
 * Connection options every worker and its queues share. BullMQ needs a real Redis (see ../shared/STACK.md);
 * `maxRetriesPerRequest: null` is what BullMQ requires of a worker connection.
 */
export function redisConnection(url: string) {
  return { ...redisEndpoint(url), maxRetriesPerRequest: null };
}
