import { Redis } from 'ioredis';

/** API-side Redis client: fails fast while Redis is down (the request gets a 503) and reconnects by itself. */
export function createRedis(url: string): Redis {
  return new Redis(url, { maxRetriesPerRequest: 1, connectTimeout: 3_000, enableOfflineQueue: true, lazyConnect: false });
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
