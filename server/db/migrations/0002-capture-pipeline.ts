import type { MigrationFn } from 'umzug';
import type { Sequelize } from 'sequelize';

/**
 * What the upload-to-result pipeline records: the importer's overrides and warnings per capture, which ingest
 * attempt is current, progress of captures and analyses, and which captures an analysis read.
 */
export const up: MigrationFn<Sequelize> = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE captures
      ADD COLUMN import_options jsonb NOT NULL DEFAULT '{}'::jsonb,
      ADD COLUMN ingest_attempt integer NOT NULL DEFAULT 1 CHECK (ingest_attempt > 0),
      ADD COLUMN progress integer NOT NULL DEFAULT 0 CHECK (progress BETWEEN 0 AND 100),
      ADD COLUMN warnings jsonb NOT NULL DEFAULT '[]'::jsonb;
    -- One shot holds a given file once; the raw bytes are stored once per lab whatever the shot.
    CREATE UNIQUE INDEX captures_shot_hash_uq ON captures (shot_id, sha256);

    ALTER TABLE analyses
      ADD COLUMN progress integer NOT NULL DEFAULT 0 CHECK (progress BETWEEN 0 AND 100),
      ADD COLUMN capture_ids jsonb NOT NULL DEFAULT '[]'::jsonb,
      ADD COLUMN started_at timestamptz;
    CREATE INDEX analyses_state_idx ON analyses (state) WHERE state IN ('queued', 'running');
    CREATE INDEX captures_state_idx ON captures (state) WHERE state IN ('queued', 'reading');
  `);
};

export const down: MigrationFn<Sequelize> = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP INDEX IF EXISTS captures_state_idx, analyses_state_idx, captures_shot_hash_uq;
    ALTER TABLE analyses DROP COLUMN started_at, DROP COLUMN capture_ids, DROP COLUMN progress;
    ALTER TABLE captures DROP COLUMN warnings, DROP COLUMN progress, DROP COLUMN ingest_attempt, DROP COLUMN import_options;
  `);
};
