import type { Redis } from 'ioredis';
import { loadConfig } from '../config.ts';
import { createRedis } from './redis.ts';

/**
 * Lab events: small notices that something of a lab changed, published on Redis by the API server and the worker
 * (any process, any thread) and streamed to browsers by GET /api/labs/:labId/events. A notice carries ids and the
 * new state, never lab data a member could not read anyway; a client that misses one (no stream, a reconnect)
 * still finds the truth by reading the records, so publishing is best effort.
 */
export interface ShotEvent {
  type: 'shot';
  shotId: string;
  campaignId: string;
  /** The shot's status after the change (shared/contracts/shot-status.ts). */
  state: string;
  /** The finished version the shot shows, or null. */
  currentVersionId: string | null;
}

export type LabEvent = ShotEvent;

const PREFIX = 'gatepost:lab-events:';
export const labEventChannel = (labId: string) => `${PREFIX}${labId}`;
export const LAB_EVENT_PATTERN = `${PREFIX}*`;
export const labIdOfChannel = (channel: string) => (channel.startsWith(PREFIX) ? channel.slice(PREFIX.length) : null);

let publisher: Redis | undefined;
let ownPublisher = false;

/** The API server hands over its own connection; a worker thread makes one on first use. */
export function useLabEventPublisher(redis: Redis): void {
  publisher = redis;
  ownPublisher = false;
}

function connection(): Redis {
  if (!publisher) {
    publisher = createRedis(loadConfig().redisUrl);
    publisher.on('error', () => {});
    ownPublisher = true;
  }
  return publisher;
}

/** Publishes one event; never throws (a missed notice costs a poll, a thrown one would fail a finished job). */
export async function publishLabEvent(labId: string, event: LabEvent): Promise<void> {
  try {
    await connection().publish(labEventChannel(labId), JSON.stringify(event));
  } catch {
    // Redis away: clients fall back to polling.
  }
}

/** Closes the connection this module opened itself (worker shutdown, tests). */
export async function closeLabEventPublisher(): Promise<void> {
  if (publisher && ownPublisher) await publisher.quit().catch(() => {});
  publisher = undefined;
  ownPublisher = false;
}
