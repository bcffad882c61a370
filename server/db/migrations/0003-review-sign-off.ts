import type { MigrationFn } from 'umzug';
import type { Sequelize } from 'sequelize';

/**
 * Review and sign-off: which analysis version a shot has under review and which one is approved, the history of
 * review requests, comments threaded on a shot, and each user's e-mail notification choices.
 */
export const up: MigrationFn<Sequelize> = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE shots
      ADD COLUMN review_analysis_id uuid,
      ADD COLUMN approved_analysis_id uuid,
      ADD FOREIGN KEY (lab_id, review_analysis_id) REFERENCES analyses (lab_id, id),
      ADD FOREIGN KEY (lab_id, approved_analysis_id) REFERENCES analyses (lab_id, id);

    CREATE TABLE review_requests (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      lab_id uuid NOT NULL,
      shot_id uuid NOT NULL,
      analysis_id uuid NOT NULL,
      requested_by uuid REFERENCES users(id) ON DELETE SET NULL,
      message text NOT NULL DEFAULT '',
      created_at timestamptz NOT NULL DEFAULT now(),
      FOREIGN KEY (lab_id, shot_id) REFERENCES shots (lab_id, id) ON DELETE CASCADE,
      FOREIGN KEY (lab_id, analysis_id) REFERENCES analyses (lab_id, id)
    );
    CREATE INDEX review_requests_shot_idx ON review_requests (shot_id, created_at);

    -- A decision answers one request (null for decisions made before requests were recorded).
    ALTER TABLE reviews ADD COLUMN request_id uuid REFERENCES review_requests(id) ON DELETE SET NULL;

    CREATE TABLE shot_comments (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      lab_id uuid NOT NULL,
      shot_id uuid NOT NULL,
      author_id uuid REFERENCES users(id) ON DELETE SET NULL,
      body text NOT NULL CHECK (length(body) BETWEEN 1 AND 4000),
      reply_to uuid REFERENCES shot_comments(id) ON DELETE SET NULL,
      created_at timestamptz NOT NULL DEFAULT now(),
      FOREIGN KEY (lab_id, shot_id) REFERENCES shots (lab_id, id) ON DELETE CASCADE
    );
    CREATE INDEX shot_comments_shot_idx ON shot_comments (shot_id, created_at);

    -- One row per user who changed a choice; no row means every kind of e-mail is on.
    CREATE TABLE notification_preferences (
      user_id uuid PRIMARY KEY REFERENCES users(id) ON DELETE CASCADE,
      review_requested boolean NOT NULL DEFAULT true,
      approved boolean NOT NULL DEFAULT true,
      returned boolean NOT NULL DEFAULT true,
      job_failed boolean NOT NULL DEFAULT true,
      updated_at timestamptz NOT NULL DEFAULT now()
    );
  `);
};

export const down: MigrationFn<Sequelize> = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP TABLE IF EXISTS notification_preferences, shot_comments;
    ALTER TABLE reviews DROP COLUMN IF EXISTS request_id;
    DROP TABLE IF EXISTS review_requests;
    ALTER TABLE shots DROP COLUMN IF EXISTS approved_analysis_id, DROP COLUMN IF EXISTS review_analysis_id;
  `);
};
