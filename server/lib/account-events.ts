import type { Redis } from 'ioredis';

/**
 * "This account's credentials changed" (signed out, signed out everywhere, password changed or reset, disabled, a
 * token revoked): published on Redis so every API process re-checks the event streams that account holds open and
 * ends those no longer valid at once, instead of at the next beat.
 */
export const ACCOUNT_CHANGED_CHANNEL = 'gatepost:account-changed';

/** Best effort: the stream's own beat re-checks anyway. */
export async function publishAccountChanged(redis: Redis, userId: string): Promise<void> {
  try {
    await redis.publish(ACCOUNT_CHANGED_CHANNEL, JSON.stringify({ userId }));
  } catch {
    // Redis away: the beat (HEARTBEAT_MS) ends the stream.
  }
}
