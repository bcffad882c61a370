import type { MigrationFn } from 'umzug';
import type { Sequelize } from 'sequelize';

/**
 * Campaign default analysis settings (threshold, hysteresis, smoothing, polarity, edges, gate mapping: applied to
 * every new shot's automatic analysis) and batch recomputes: one row per batch, with the settings it applied and the
 * shots it chose; every analysis version a batch made names it.
 */
export const up: MigrationFn<Sequelize> = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE campaigns ADD COLUMN analysis_settings jsonb;

    CREATE TABLE analysis_batches (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      lab_id uuid NOT NULL,
      campaign_id uuid NOT NULL,
      settings jsonb NOT NULL,
      shot_ids jsonb NOT NULL,
      -- Shots chosen but left out, with the reason ([{shotId, number, reason}]).
      skipped jsonb NOT NULL DEFAULT '[]',
      requested_by uuid REFERENCES users(id) ON DELETE SET NULL,
      created_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (lab_id, id),
      FOREIGN KEY (lab_id, campaign_id) REFERENCES campaigns (lab_id, id) ON DELETE CASCADE
    );
    CREATE INDEX analysis_batches_campaign_idx ON analysis_batches (campaign_id, created_at DESC);

    ALTER TABLE analyses
      ADD COLUMN batch_id uuid,
      -- The version that was current when the batch made this one: the "before" of the batch's table.
      ADD COLUMN previous_analysis_id uuid,
      ADD FOREIGN KEY (lab_id, batch_id) REFERENCES analysis_batches (lab_id, id) ON DELETE SET NULL (batch_id),
      ADD FOREIGN KEY (lab_id, previous_analysis_id) REFERENCES analyses (lab_id, id) ON DELETE SET NULL (previous_analysis_id);
    CREATE INDEX analyses_batch_idx ON analyses (batch_id) WHERE batch_id IS NOT NULL;
  `);
};

export const down: MigrationFn<Sequelize> = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE analyses DROP COLUMN IF EXISTS batch_id, DROP COLUMN IF EXISTS previous_analysis_id;
    DROP TABLE IF EXISTS analysis_batches;
    ALTER TABLE campaigns DROP COLUMN IF EXISTS analysis_settings;
  `);
};
