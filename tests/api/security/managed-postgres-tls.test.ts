// Issue 12, item 1: pointing Gatepost at a managed PostgreSQL over TLS, as README "Your own PostgreSQL and Redis"
// describes. A cluster of its own is given a self-signed certificate (a stand-in for the provider's CA); the app's
// connection (createSequelize, and the migrator's lock connection) must encrypt and check the certificate.
import { execFileSync } from 'node:child_process';
import { appendFileSync, chmodSync, chownSync, copyFileSync, mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { findPostgresBinDir, freePort, startPostgres, type RunningService } from '../../../scripts/lib/services.ts';
import { createSequelize, postgresTls } from '../../../server/db/sequelize.ts';

let folder: string;
let postgres: RunningService;
let caFile: string;

beforeAll(async () => {
  folder = mkdtempSync(join(tmpdir(), 'gatepost-tls-test-'));
  chmodSync(folder, 0o711);
  const dir = join(folder, 'postgres');
  postgres = await startPostgres({ dir, port: await freePort(), durable: false, say: () => undefined });
  // A certificate for 127.0.0.1 (subjectAltName), self-signed: it is its own CA.
  caFile = join(folder, 'ca.pem');
  const keyFile = join(folder, 'key.pem');
  execFileSync('openssl', ['req', '-x509', '-newkey', 'rsa:2048', '-nodes', '-days', '1', '-subj', '/CN=127.0.0.1',
    '-addext', 'subjectAltName=IP:127.0.0.1', '-keyout', keyFile, '-out', caFile], { stdio: 'ignore' });
  // The server reads its key and certificate as its own OS user, from inside the cluster folder.
  const owner = statSync(dir);
  for (const [from, to] of [[caFile, 'server.crt'], [keyFile, 'server.key']]) {
    copyFileSync(from, join(dir, to));
    chownSync(join(dir, to), owner.uid, owner.gid);
    chmodSync(join(dir, to), 0o600);
  }
  appendFileSync(join(dir, 'postgresql.conf'), "\nssl = on\nssl_cert_file = 'server.crt'\nssl_key_file = 'server.key'\n");
  const pgCtl = join(findPostgresBinDir()!, 'pg_ctl');
  const args = ['-D', dir, 'reload'];
  if (process.getuid?.() === 0) execFileSync('runuser', ['-u', 'postgres', '--', pgCtl, ...args]);
  else execFileSync(pgCtl, args);
}, 60_000);

afterAll(async () => {
  await postgres?.stop();
  rmSync(folder, { recursive: true, force: true });
});

/** Whether the app's own connection is encrypted, read from the server's side. */
async function connectionIsEncrypted(url: string): Promise<boolean> {
  const sequelize = createSequelize(url);
  try {
    const [rows] = await sequelize.query('SELECT ssl FROM pg_stat_ssl WHERE pid = pg_backend_pid()');
    return (rows as Array<{ ssl: boolean }>)[0].ssl;
  } finally {
    await sequelize.close();
  }
}

describe('a managed PostgreSQL over TLS', () => {
  it('When the URL says sslmode=verify-full with the provider\'s CA, then the app connects encrypted', async () => {
    expect(await connectionIsEncrypted(`${postgres.url}?sslmode=verify-full&sslrootcert=${caFile}`)).toBe(true);
  });

  it('When the URL has no sslmode, then the connection is plain (the loopback default of npm start)', async () => {
    expect(await connectionIsEncrypted(postgres.url)).toBe(false);
  });

  it('When the server\'s certificate is not signed by a CA the app trusts, then it refuses to connect', async () => {
    await expect(connectionIsEncrypted(`${postgres.url}?sslmode=require`)).rejects.toThrow(/self[- ]signed certificate/);
  });

  it('When sslmode is misspelt, then the error names the variable and the accepted values', () => {
    expect(() => postgresTls(`${postgres.url}?sslmode=verify_full`)).toThrow(
      'GATEPOST_DATABASE_URL: sslmode=verify_full is not one of disable, require, verify-ca, verify-full, no-verify',
    );
  });
});
