import type { MigrationFn } from 'umzug';
import type { Sequelize } from 'sequelize';

/**
 * The launcher a campaign fires from: tube length and bore, SI. Both optional (a campaign may use a launcher that
 * is not a tube); the trends page's launcher model starts from them instead of asking each time.
 */
export const up: MigrationFn<Sequelize> = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE campaigns
      ADD COLUMN tube_length_m double precision CHECK (tube_length_m > 0),
      ADD COLUMN bore_m double precision CHECK (bore_m > 0);
  `);
};

export const down: MigrationFn<Sequelize> = async ({ context: sequelize }) => {
  await sequelize.query('ALTER TABLE campaigns DROP COLUMN IF EXISTS tube_length_m, DROP COLUMN IF EXISTS bore_m;');
};
