import { Redis } from 'ioredis';

/** API-side Redis client: fails fast while Redis is down (the request gets a 503) and reconnects by itself. */
export function createRedis(url: string): Redis {
  return new Redis(url, { maxRetriesPerRequest: 1, connectTimeout: 3_000, enableOfflineQueue: true, lazyConnect: false });
}
