import { Redis } from 'ioredis';

/** API-side Redis client: fails fast while Redis is down (the request gets a 503) and reconnects by itself. */
export function createRedis(url: string): Redis {
  return new Redis(url, { maxRetriesPerRequest: 1, connectTimeout: 3_000, enableOfflineQueue: true, lazyConnect: false });
}

/** Host, port, password and database of a redis:// URL, as BullMQ's `connection` option takes them. */
export function redisEndpoint(url: string) {
  const u = new URL(url);
  return {
    host: u.hostname,
    port: Number(u.port || 6379),
    password: u.password || undefined,
    db: u.pathname.length > 1 ? Number(u.pathname.slice(1)) : 0,
  };
}
