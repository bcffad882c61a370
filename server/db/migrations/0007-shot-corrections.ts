import type { MigrationFn } from 'umzug';
import type { Sequelize } from 'sequelize';

/**
 * Corrections to a logged shot. A file dropped by mistake is removed from the shot (removed_at, removed_by) but
 * its row and raw bytes stay, so the audit trail and older versions that read it still resolve. A shot logged by
 * mistake is marked deleted (deleted_at, deleted_by): kept out of lists, trends and exports, restorable by an admin.
 */
export const up: MigrationFn<Sequelize> = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE captures
      ADD COLUMN removed_at timestamptz,
      ADD COLUMN removed_by uuid REFERENCES users(id) ON DELETE SET NULL;
    ALTER TABLE shots
      ADD COLUMN deleted_at timestamptz,
      ADD COLUMN deleted_by uuid REFERENCES users(id) ON DELETE SET NULL;
    CREATE INDEX shots_live_by_campaign ON shots (campaign_id) WHERE deleted_at IS NULL;
  `);
};

export const down: MigrationFn<Sequelize> = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP INDEX IF EXISTS shots_live_by_campaign;
    ALTER TABLE shots DROP COLUMN IF EXISTS deleted_at, DROP COLUMN IF EXISTS deleted_by;
    ALTER TABLE captures DROP COLUMN IF EXISTS removed_at, DROP COLUMN IF EXISTS removed_by;
  `);
};
