import { readdirSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { Umzug, SequelizeStorage } from 'umzug';
import type { Sequelize } from 'sequelize';
import pg from 'pg';
import { postgresTls } from './sequelize.ts';

const migrationsDir = path.join(path.dirname(fileURLToPath(import.meta.url)), 'migrations');

/**
 * Migrations are the only way the schema changes: files `migrations/NNNN-name.ts` (`.js` in the compiled build,
 * dist/node), applied in name order; the name without its extension is what the database records.
 */
export function createMigrator(sequelize: Sequelize) {
  const files = readdirSync(migrationsDir).filter((f) => /^\d{4}-.+\.(ts|js)$/.test(f)).sort();
  return new Umzug({
    migrations: files.map((file) => ({
      name: file.replace(/\.(ts|js)$/, ''),
      up: async ({ context }: { context: Sequelize }) => (await import(pathToFileURL(path.join(migrationsDir, file)).href)).up({ context, name: file, path: file }),
      down: async ({ context }: { context: Sequelize }) => (await import(pathToFileURL(path.join(migrationsDir, file)).href)).down({ context, name: file, path: file }),
    })),
    context: sequelize,
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger: undefined,
  });
}

/**
 * Applies pending migrations while holding a PostgreSQL advisory lock, so two processes starting at once do not
 * race. The lock lives on its own connection: a session lock taken through the pool could be released on another.
 */
export async function migrateUp(sequelize: Sequelize, databaseUrl: string): Promise<string[]> {
  const lockId = 0x6761_7465; // arbitrary, constant for Gatepost
  const { url, ssl } = postgresTls(databaseUrl);
  const lock = new pg.Client({ connectionString: url, ssl });
  await lock.connect();
  try {
    await lock.query('SELECT pg_advisory_lock($1)', [lockId]);
    const applied = await createMigrator(sequelize).up();
    return applied.map((m) => m.name);
  } finally {
    await lock.end();
  }
}
