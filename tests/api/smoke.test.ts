// The test machinery itself: the throwaway PostgreSQL and Redis of scripts/with-services.sh answer, keep what is
// written to them, and are the throwaway kind (no Redis persistence). Runs before the app has any API.
import { createRequire } from 'node:module';
import { randomUUID } from 'node:crypto';
import Redis from 'ioredis';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

// pg ships no type declarations (@types/pg is not installed); this is the part of its API used here.
interface PgClient {
  connect(): Promise<void>;
  query(sql: string, values?: unknown[]): Promise<{ rows: Array<Record<string, unknown>> }>;
  end(): Promise<void>;
}
const { Client } = createRequire(import.meta.url)('pg') as { Client: new (options: { connectionString: string }) => PgClient };

describe('throwaway PostgreSQL', () => {
  const url = process.env.GATEPOST_TEST_DATABASE_URL as string;
  let client: PgClient;
  beforeAll(async () => {
    client = new Client({ connectionString: url });
    await client.connect();
  });
  afterAll(() => client.end());

  it('When connecting to GATEPOST_TEST_DATABASE_URL, then it is the gatepost database on loopback', async () => {
    expect(url).toMatch(/^postgres:\/\/gatepost:[A-Za-z0-9_-]+@127\.0\.0\.1:\d+\/gatepost$/);
    const { rows } = await client.query('SELECT current_database() AS db, inet_server_addr()::text AS addr');
    expect(rows[0]).toEqual({ db: 'gatepost', addr: '127.0.0.1/32' });
  });

  it('When a row is written in a transaction, then it reads back unchanged (UTF-8 and numbers intact)', async () => {
    await client.query('CREATE TEMP TABLE smoke (id serial PRIMARY KEY, label text, speed_m_per_s double precision)');
    await client.query('BEGIN');
    await client.query('INSERT INTO smoke (label, speed_m_per_s) VALUES ($1, $2)', ['Schuss Nr. 7 – Ø 4,5 mm', 1234.5678]);
    await client.query('COMMIT');
    const { rows } = await client.query('SELECT label, speed_m_per_s FROM smoke');
    expect(rows).toEqual([{ label: 'Schuss Nr. 7 – Ø 4,5 mm', speed_m_per_s: 1234.5678 }]);
  });

  it('When asked for its settings, then it is the fast throwaway kind (fsync off), never the durable start cluster', async () => {
    const { rows } = await client.query("SELECT current_setting('fsync') AS fsync, current_setting('server_encoding') AS encoding");
    expect(rows[0]).toEqual({ fsync: 'off', encoding: 'UTF8' });
  });
});

describe('throwaway Redis', () => {
  const url = process.env.GATEPOST_TEST_REDIS_URL as string;
  let redis: Redis;
  beforeAll(() => {
    redis = new Redis(url, { maxRetriesPerRequest: null, lazyConnect: false });
  });
  afterAll(async () => {
    await redis.quit();
  });

  it('When a key is set with an expiry, then it reads back and carries the expiry', async () => {
    expect(url).toMatch(/^redis:\/\/:[A-Za-z0-9_-]+@127\.0\.0\.1:\d+$/);
    const key = `smoke:${randomUUID()}`;
    await redis.set(key, 'gate A → gate B', 'EX', 60);
    expect(await redis.get(key)).toBe('gate A → gate B');
    const ttl = await redis.ttl(key);
    expect(ttl).toBeGreaterThan(0);
    expect(ttl).toBeLessThanOrEqual(60);
  });

  it('When asked for its persistence settings, then it keeps nothing on disk', async () => {
    expect(await redis.config('GET', 'appendonly')).toEqual(['appendonly', 'no']);
    expect(await redis.config('GET', 'save')).toEqual(['save', '']);
  });
});
