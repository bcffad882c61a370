import type { MigrationFn } from 'umzug';
import type { Sequelize } from 'sequelize';

/**
 * The first schema: labs, people and access; the lab's library (projectiles, gate rigs); campaigns and shots;
 * captures, analyses, reviews; the audit trail. Quantities are stored in SI units, named with their unit
 * (`diameter_m`, `tube_pressure_pa`). Every lab-owned row carries `lab_id`, so each query can be scoped to one lab.
 */
export const up: MigrationFn<Sequelize> = async ({ context: sequelize }) => {
  await sequelize.query(`
    CREATE EXTENSION IF NOT EXISTS pgcrypto;

    CREATE TABLE labs (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      name text NOT NULL CHECK (length(name) BETWEEN 1 AND 200),
      slug text NOT NULL UNIQUE CHECK (slug ~ '^[a-z0-9][a-z0-9-]{0,62}$'),
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now()
    );

    CREATE TABLE users (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      email text NOT NULL UNIQUE CHECK (email = lower(email) AND position('@' in email) > 1),
      name text NOT NULL CHECK (length(name) BETWEEN 1 AND 200),
      password_hash text NOT NULL,
      disabled_at timestamptz,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now()
    );

    CREATE TABLE memberships (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      lab_id uuid NOT NULL REFERENCES labs(id) ON DELETE CASCADE,
      user_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
      role text NOT NULL CHECK (role IN ('admin', 'experimenter', 'analyst', 'reviewer')),
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (lab_id, user_id)
    );
    CREATE INDEX memberships_user_idx ON memberships (user_id);

    CREATE TABLE api_tokens (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      user_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
      name text NOT NULL CHECK (length(name) BETWEEN 1 AND 100),
      token_hash text NOT NULL UNIQUE,
      token_prefix text NOT NULL,
      expires_at timestamptz,
      last_used_at timestamptz,
      revoked_at timestamptz,
      created_at timestamptz NOT NULL DEFAULT now()
    );
    CREATE INDEX api_tokens_user_idx ON api_tokens (user_id);

    CREATE TABLE invitations (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      lab_id uuid NOT NULL REFERENCES labs(id) ON DELETE CASCADE,
      email text NOT NULL CHECK (email = lower(email)),
      role text NOT NULL CHECK (role IN ('admin', 'experimenter', 'analyst', 'reviewer')),
      token_hash text NOT NULL UNIQUE,
      invited_by uuid REFERENCES users(id) ON DELETE SET NULL,
      expires_at timestamptz NOT NULL,
      accepted_at timestamptz,
      accepted_by uuid REFERENCES users(id) ON DELETE SET NULL,
      revoked_at timestamptz,
      created_at timestamptz NOT NULL DEFAULT now()
    );
    CREATE INDEX invitations_lab_idx ON invitations (lab_id, created_at DESC);

    CREATE TABLE campaigns (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      lab_id uuid NOT NULL REFERENCES labs(id) ON DELETE CASCADE,
      name text NOT NULL CHECK (length(name) BETWEEN 1 AND 200),
      description text NOT NULL DEFAULT '',
      started_on date,
      created_by uuid REFERENCES users(id) ON DELETE SET NULL,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (lab_id, name),
      UNIQUE (lab_id, id)
    );

    CREATE TABLE projectiles (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      lab_id uuid NOT NULL REFERENCES labs(id) ON DELETE CASCADE,
      name text NOT NULL,
      material text NOT NULL DEFAULT '',
      diameter_m double precision NOT NULL CHECK (diameter_m > 0),
      diameter_tolerance_m double precision NOT NULL DEFAULT 0 CHECK (diameter_tolerance_m >= 0),
      mass_kg double precision NOT NULL CHECK (mass_kg > 0),
      mass_tolerance_kg double precision NOT NULL DEFAULT 0 CHECK (mass_tolerance_kg >= 0),
      notes text NOT NULL DEFAULT '',
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (lab_id, name),
      UNIQUE (lab_id, id)
    );

    -- gates: [{ "label": "A", "position_m": 0, "position_uncertainty_m": 0.0005 }, ...] in flight order
    CREATE TABLE gate_rigs (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      lab_id uuid NOT NULL REFERENCES labs(id) ON DELETE CASCADE,
      name text NOT NULL,
      gates jsonb NOT NULL CHECK (jsonb_typeof(gates) = 'array'),
      beam_width_m double precision NOT NULL DEFAULT 0 CHECK (beam_width_m >= 0),
      sensor_type text NOT NULL DEFAULT 'phototransistor'
        CHECK (sensor_type IN ('photodiode', 'phototransistor', 'photodarlington', 'other')),
      notes text NOT NULL DEFAULT '',
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (lab_id, name),
      UNIQUE (lab_id, id)
    );

    -- Composite foreign keys (lab_id, x_id) make it impossible for a shot to point at another lab's records.
    CREATE TABLE shots (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      lab_id uuid NOT NULL REFERENCES labs(id) ON DELETE CASCADE,
      campaign_id uuid NOT NULL,
      number integer NOT NULL CHECK (number > 0),
      fired_at timestamptz,
      projectile_id uuid,
      gate_rig_id uuid,
      tube_pressure_pa double precision CHECK (tube_pressure_pa >= 0),
      seal_type text NOT NULL DEFAULT '',
      ambient_temperature_k double precision CHECK (ambient_temperature_k > 0),
      ambient_pressure_pa double precision CHECK (ambient_pressure_pa > 0),
      notes text NOT NULL DEFAULT '',
      status text NOT NULL DEFAULT 'draft'
        CHECK (status IN ('draft', 'processing', 'analysed', 'in_review', 'approved', 'returned', 'failed')),
      current_analysis_id uuid,
      created_by uuid REFERENCES users(id) ON DELETE SET NULL,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (campaign_id, number),
      UNIQUE (lab_id, id),
      FOREIGN KEY (lab_id, campaign_id) REFERENCES campaigns (lab_id, id) ON DELETE CASCADE,
      FOREIGN KEY (lab_id, projectile_id) REFERENCES projectiles (lab_id, id),
      FOREIGN KEY (lab_id, gate_rig_id) REFERENCES gate_rigs (lab_id, id)
    );
    CREATE INDEX shots_lab_campaign_idx ON shots (lab_id, campaign_id, number);

    CREATE TABLE captures (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      lab_id uuid NOT NULL,
      shot_id uuid NOT NULL,
      file_name text NOT NULL,
      size_bytes bigint NOT NULL CHECK (size_bytes >= 0),
      sha256 text NOT NULL CHECK (sha256 ~ '^[0-9a-f]{64}$'),
      storage_key text NOT NULL,
      state text NOT NULL DEFAULT 'queued' CHECK (state IN ('queued', 'reading', 'ready', 'failed')),
      error text,
      layout jsonb,
      channels jsonb,
      sample_count bigint,
      time_base jsonb,
      uploaded_by uuid REFERENCES users(id) ON DELETE SET NULL,
      uploaded_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      FOREIGN KEY (lab_id, shot_id) REFERENCES shots (lab_id, id) ON DELETE CASCADE
    );
    CREATE INDEX captures_shot_idx ON captures (shot_id);
    CREATE INDEX captures_lab_hash_idx ON captures (lab_id, sha256);

    CREATE TABLE analyses (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      lab_id uuid NOT NULL,
      shot_id uuid NOT NULL,
      version integer NOT NULL CHECK (version > 0),
      parameters jsonb NOT NULL,
      engine_version text NOT NULL,
      state text NOT NULL DEFAULT 'queued' CHECK (state IN ('queued', 'running', 'done', 'failed')),
      results jsonb,
      error text,
      job_key text NOT NULL UNIQUE,
      requested_by uuid REFERENCES users(id) ON DELETE SET NULL,
      created_at timestamptz NOT NULL DEFAULT now(),
      completed_at timestamptz,
      UNIQUE (shot_id, version),
      UNIQUE (lab_id, id),
      FOREIGN KEY (lab_id, shot_id) REFERENCES shots (lab_id, id) ON DELETE CASCADE
    );

    ALTER TABLE shots ADD FOREIGN KEY (lab_id, current_analysis_id) REFERENCES analyses (lab_id, id);

    CREATE TABLE reviews (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      lab_id uuid NOT NULL,
      shot_id uuid NOT NULL,
      analysis_id uuid NOT NULL,
      reviewer_id uuid REFERENCES users(id) ON DELETE SET NULL,
      decision text NOT NULL CHECK (decision IN ('approved', 'returned')),
      comment text NOT NULL DEFAULT '',
      created_at timestamptz NOT NULL DEFAULT now(),
      CHECK (decision = 'approved' OR length(comment) > 0),
      FOREIGN KEY (lab_id, shot_id) REFERENCES shots (lab_id, id) ON DELETE CASCADE,
      FOREIGN KEY (lab_id, analysis_id) REFERENCES analyses (lab_id, id)
    );
    CREATE INDEX reviews_shot_idx ON reviews (shot_id, created_at);

    CREATE TABLE audit_events (
      id bigserial PRIMARY KEY,
      lab_id uuid REFERENCES labs(id) ON DELETE CASCADE,
      actor_id uuid REFERENCES users(id) ON DELETE SET NULL,
      action text NOT NULL,
      target_type text,
      target_id text,
      details jsonb NOT NULL DEFAULT '{}'::jsonb,
      ip text,
      created_at timestamptz NOT NULL DEFAULT now()
    );
    CREATE INDEX audit_events_lab_idx ON audit_events (lab_id, created_at DESC);
    CREATE INDEX audit_events_target_idx ON audit_events (target_type, target_id);

    -- The audit trail is append-only at the database itself, whatever the application code does.
    CREATE FUNCTION audit_events_append_only() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      RAISE EXCEPTION 'audit_events is append-only';
    END $$;
    CREATE TRIGGER audit_events_no_update BEFORE UPDATE OR DELETE ON audit_events
      FOR EACH ROW EXECUTE FUNCTION audit_events_append_only();
  `);
};

export const down: MigrationFn<Sequelize> = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP TABLE IF EXISTS audit_events, reviews CASCADE;
    ALTER TABLE IF EXISTS shots DROP CONSTRAINT IF EXISTS shots_lab_id_current_analysis_id_fkey;
    DROP TABLE IF EXISTS analyses, captures, shots, gate_rigs, projectiles, campaigns, invitations, api_tokens,
      memberships, users, labs CASCADE;
    DROP FUNCTION IF EXISTS audit_events_append_only();
  `);
};
