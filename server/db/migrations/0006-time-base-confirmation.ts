import type { MigrationFn } from 'umzug';
import type { Sequelize } from 'sequelize';

/**
 * "I checked the time base": an analyst's confirmation that the read behind a version marked "check the time base"
 * is right, so review may approve that version. One per version, kept with it (the version's numbers stay as they
 * are); the audit trail keeps who and when as well.
 */
export const up: MigrationFn<Sequelize> = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE analyses
      ADD COLUMN time_base_confirmed_by uuid REFERENCES users(id) ON DELETE SET NULL,
      ADD COLUMN time_base_confirmed_at timestamptz,
      ADD COLUMN time_base_confirmation_note text;
  `);
};

export const down: MigrationFn<Sequelize> = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE analyses
      DROP COLUMN IF EXISTS time_base_confirmed_by,
      DROP COLUMN IF EXISTS time_base_confirmed_at,
      DROP COLUMN IF EXISTS time_base_confirmation_note;
  `);
};
