// A plain pg client for tests that talk to PostgreSQL itself (the service scripts, access rules), not through the app.
import { createRequire } from 'node:module';

// pg ships no type declarations (@types/pg is not installed); this is the part of its API used here.
export interface PgClient {
  connect(): Promise<void>;
  query(sql: string, values?: unknown[]): Promise<{ rows: Array<Record<string, unknown>> }>;
  end(): Promise<void>;
}
export const { Client } = createRequire(import.meta.url)('pg') as { Client: new (options: { connectionString: string }) => PgClient };

/** Runs `sql` on a fresh connection to `url` and returns its rows. */
export async function query(url: string, sql: string): Promise<Array<Record<string, unknown>>> {
  const client = new Client({ connectionString: url });
  await client.connect();
  try {
    return (await client.query(sql)).rows;
  } finally {
    await client.end();
  }
}
