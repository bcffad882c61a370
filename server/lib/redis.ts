import { Redis } from 'ioredis';

/** A Redis command unanswered this long fails (503), so a Redis that hangs (stopped, swapping) does not hang requests. */
export const REDIS_COMMAND_TIMEOUT_MS = 5_000;

/**
 * API-side Redis client: fails fast while Redis is down or hangs (the request gets a 503) and reconnects by itself.
 * Issue 12 review: with Redis stopped (SIGSTOP) a sign-out waited with no answer for as long as Redis did.
 */
export function createRedis(url: string): Redis {
  return new Redis(url, { maxRetriesPerRequest: 1, connectTimeout: 3_000, commandTimeout: REDIS_COMMAND_TIMEOUT_MS, enableOfflineQueue: true, lazyConnect: false });
}

/**
 * Host, port, user, password, database and TLS of a redis:// or rediss:// URL, as BullMQ's `connection` option takes
 * them. rediss:// turns TLS on with Node's certificate checks (add a private CA with NODE_EXTRA_CA_CERTS).
 */
export function redisEndpoint(url: string) {
  const u = new URL(url);
  return {
    host: u.hostname,
    port: Number(u.port || 6379),
    username: u.username ? decodeURIComponent(u.username) : undefined,
    password: u.password ? decodeURIComponent(u.password) : undefined,
    db: u.pathname.length > 1 ? Number(u.pathname.slice(1)) : 0,
    ...(u.protocol === 'rediss:' ? { tls: { servername: u.hostname } } : {}),
  };
}
