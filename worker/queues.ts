import { Queue } from 'bullmq';

/**
 * Queue names and the connection options every queue and worker shares. BullMQ needs a real Redis
 * (see ../shared/STACK.md); `maxRetriesPerRequest: null` is what BullMQ requires of a worker connection.
 */
export const QUEUES = {
  /** Import a stored capture file (issue 5). */
  ingest: 'gatepost-ingest',
  /** Run the analysis engine for one analysis version (issue 5). */
  analysis: 'gatepost-analysis',
} as const;

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
