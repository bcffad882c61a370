import type { MigrationFn } from 'umzug';
import type { Sequelize } from 'sequelize';

/**
 * Accounts people can manage (issue 12, item 10).
 * - users.session_generation: every browser session carries the generation it was issued under; "sign out
 *   everywhere", a password change and a password reset raise it, so every older session stops at once (checked
 *   with the user row the auth middleware reads anyway; no per-session list to keep).
 * - users.disabled_by: who disabled the account (disabled_at was there from 0001); the audit trail has the rest.
 * - password_resets: single-use reset links, stored as the SHA-256 of their secret, with an expiry.
 */
export const up: MigrationFn<Sequelize> = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE users
      ADD COLUMN session_generation integer NOT NULL DEFAULT 0,
      ADD COLUMN disabled_by uuid REFERENCES users(id) ON DELETE SET NULL;
    CREATE TABLE password_resets (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      user_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
      token_hash text NOT NULL UNIQUE,
      expires_at timestamptz NOT NULL,
      used_at timestamptz,
      requested_ip text,
      created_at timestamptz NOT NULL DEFAULT now()
    );
    CREATE INDEX password_resets_open_by_user ON password_resets (user_id) WHERE used_at IS NULL;
  `);
};

export const down: MigrationFn<Sequelize> = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP TABLE IF EXISTS password_resets;
    ALTER TABLE users DROP COLUMN IF EXISTS session_generation, DROP COLUMN IF EXISTS disabled_by;
  `);
};
