import { readFileSync } from 'node:fs';
import { Sequelize } from 'sequelize';
import type { Logger } from '../lib/logger.ts';
import { initModels } from './models/index.ts';

/** TLS options for the pg driver, or false for a plain connection. */
export type PostgresTls = false | { rejectUnauthorized: boolean; ca?: string; servername?: string };

/**
 * Reads libpq's TLS parameters from a postgres:// URL, for a managed PostgreSQL (see README "Your own PostgreSQL
 * and Redis"): `sslmode=require`, `verify-ca` or `verify-full` turn TLS on with the server's certificate checked
 * (against `sslrootcert=/path/ca.pem` when given, else Node's CAs plus NODE_EXTRA_CA_CERTS); `sslmode=no-verify`
 * encrypts without checking (only for a trusted network); no `sslmode` or `disable` is plain TCP. Returns the URL
 * without those parameters, because Sequelize would hand them to the driver as strings it cannot use.
 */
export function postgresTls(databaseUrl: string): { url: string; ssl: PostgresTls } {
  const url = new URL(databaseUrl);
  const mode = url.searchParams.get('sslmode') ?? (url.searchParams.get('ssl') === 'true' ? 'verify-full' : 'disable');
  const rootCert = url.searchParams.get('sslrootcert');
  for (const name of ['sslmode', 'ssl', 'sslrootcert']) url.searchParams.delete(name);
  const plain = url.toString();
  if (mode === 'disable' || mode === 'prefer' || mode === 'allow') return { url: plain, ssl: false };
  if (!['require', 'verify-ca', 'verify-full', 'no-verify'].includes(mode)) {
    throw new Error(`GATEPOST_DATABASE_URL: sslmode=${mode} is not one of disable, require, verify-ca, verify-full, no-verify`);
  }
  return {
    url: plain,
    ssl: {
      rejectUnauthorized: mode !== 'no-verify',
      ...(rootCert ? { ca: readFileSync(rootCert, 'utf8') } : {}),
      servername: url.hostname,
    },
  };
}

/** Size of a connection pool: at most `max` connections, of which `min` stay open while idle. */
export interface PoolSize {
  max: number;
  min: number;
}

/**
 * One connection pool per process (per thread, in the worker). Models are registered here; the schema comes only
 * from migrations. Default pool: up to 10 connections, each closed after 10 s idle.
 */
export function createSequelize(databaseUrl: string, logger?: Logger, pool: PoolSize = { max: 10, min: 0 }): Sequelize {
  const { url, ssl } = postgresTls(databaseUrl);
  const sequelize = new Sequelize(url, {
    dialect: 'postgres',
    logging: logger ? (sql) => logger.trace({ sql }, 'sql') : false,
    pool: { max: pool.max, min: pool.min, idle: 10_000, acquire: 10_000 },
    define: { underscored: true },
    dialectOptions: { connectionTimeoutMillis: 5_000, ...(ssl ? { ssl } : {}) },
  });
  initModels(sequelize);
  return sequelize;
}
