import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize, type ForeignKey } from 'sequelize';
import type { Role } from '../../../shared/contracts/roles.ts';
import type { ShotStatus } from '../../../shared/contracts/shot-status.ts';

/*
 * Sequelize models mirror the tables the migrations create (never `sync()`). Only the data-access files of
 * server/modules use them; everything above returns plain objects.
 */

export class Lab extends Model<InferAttributes<Lab>, InferCreationAttributes<Lab>> {
  declare id: CreationOptional<string>;
  declare name: string;
  declare slug: string;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<string>;
  declare email: string;
  declare name: string;
  declare passwordHash: string;
  declare disabledAt: CreationOptional<Date | null>;
  /** Who disabled the account (migration 0008). */
  declare disabledBy: CreationOptional<string | null>;
  /** Raised by sign-out-everywhere, a password change or reset: sessions of an older generation stop working. */
  declare sessionGeneration: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

/** A single-use password reset link (migration 0008); only the SHA-256 of its secret is kept. */
export class PasswordReset extends Model<InferAttributes<PasswordReset>, InferCreationAttributes<PasswordReset>> {
  declare id: CreationOptional<string>;
  declare userId: ForeignKey<User['id']>;
  declare tokenHash: string;
  declare expiresAt: Date;
  declare usedAt: CreationOptional<Date | null>;
  declare requestedIp: string | null;
  declare createdAt: CreationOptional<Date>;
}

export class Membership extends Model<InferAttributes<Membership>, InferCreationAttributes<Membership>> {
  declare id: CreationOptional<string>;
  declare labId: ForeignKey<Lab['id']>;
  declare userId: ForeignKey<User['id']>;
  declare role: Role;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class ApiToken extends Model<InferAttributes<ApiToken>, InferCreationAttributes<ApiToken>> {
  declare id: CreationOptional<string>;
  declare userId: ForeignKey<User['id']>;
  declare name: string;
  declare tokenHash: string;
  declare tokenPrefix: string;
  declare expiresAt: Date | null;
  declare lastUsedAt: CreationOptional<Date | null>;
  declare revokedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
}

export class Invitation extends Model<InferAttributes<Invitation>, InferCreationAttributes<Invitation>> {
  declare id: CreationOptional<string>;
  declare labId: ForeignKey<Lab['id']>;
  declare email: string;
  declare role: Role;
  declare tokenHash: string;
  declare invitedBy: string | null;
  declare expiresAt: Date;
  declare acceptedAt: CreationOptional<Date | null>;
  declare acceptedBy: CreationOptional<string | null>;
  declare revokedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
}

export class Campaign extends Model<InferAttributes<Campaign>, InferCreationAttributes<Campaign>> {
  declare id: CreationOptional<string>;
  declare labId: string;
  declare name: string;
  declare description: CreationOptional<string>;
  declare startedOn: string | null;
  /** The launcher tube's length and bore, m; null when not logged. */
  declare tubeLengthM: CreationOptional<number | null>;
  declare boreM: CreationOptional<number | null>;
  /** Default analysis settings of new shots (shared/contracts/analysis-settings.ts); null when none are kept. */
  declare analysisSettings: CreationOptional<Record<string, unknown> | null>;
  declare createdBy: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class Projectile extends Model<InferAttributes<Projectile>, InferCreationAttributes<Projectile>> {
  declare id: CreationOptional<string>;
  declare labId: string;
  declare name: string;
  declare material: CreationOptional<string>;
  declare diameterM: number;
  declare diameterToleranceM: number;
  declare massKg: number;
  declare massToleranceKg: number;
  declare notes: CreationOptional<string>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export interface RigGate {
  label: string;
  position_m: number;
  position_uncertainty_m: number;
}

export class GateRig extends Model<InferAttributes<GateRig>, InferCreationAttributes<GateRig>> {
  declare id: CreationOptional<string>;
  declare labId: string;
  declare name: string;
  declare gates: RigGate[];
  declare beamWidthM: number;
  declare sensorType: 'photodiode' | 'phototransistor' | 'photodarlington' | 'other';
  declare notes: CreationOptional<string>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export type { ShotStatus };

export class Shot extends Model<InferAttributes<Shot>, InferCreationAttributes<Shot>> {
  declare id: CreationOptional<string>;
  declare labId: string;
  declare campaignId: string;
  declare number: number;
  declare firedAt: Date | null;
  declare projectileId: string | null;
  declare gateRigId: string | null;
  declare tubePressurePa: number | null;
  declare sealType: CreationOptional<string>;
  declare ambientTemperatureK: number | null;
  declare ambientPressurePa: number | null;
  declare notes: CreationOptional<string>;
  declare status: CreationOptional<ShotStatus>;
  declare currentAnalysisId: CreationOptional<string | null>;
  /** The version a pending review request is about (null when none is pending). */
  declare reviewAnalysisId: CreationOptional<string | null>;
  /** The version a reviewer signed off last (it stays on record when a later version becomes current). */
  declare approvedAnalysisId: CreationOptional<string | null>;
  /** Set when the shot was deleted (logged by mistake): it is left out of lists, trends and exports. */
  declare deletedAt: CreationOptional<Date | null>;
  declare deletedBy: CreationOptional<string | null>;
  declare createdBy: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class Capture extends Model<InferAttributes<Capture>, InferCreationAttributes<Capture>> {
  declare id: CreationOptional<string>;
  declare labId: string;
  declare shotId: string;
  declare fileName: string;
  declare sizeBytes: number;
  declare sha256: string;
  declare storageKey: string;
  declare state: CreationOptional<'queued' | 'reading' | 'ready' | 'failed'>;
  declare error: CreationOptional<string | null>;
  declare layout: CreationOptional<object | null>;
  declare channels: CreationOptional<object | null>;
  declare sampleCount: CreationOptional<number | null>;
  declare timeBase: CreationOptional<object | null>;
  declare importOptions: CreationOptional<Record<string, unknown>>;
  declare ingestAttempt: CreationOptional<number>;
  declare progress: CreationOptional<number>;
  declare warnings: CreationOptional<string[]>;
  declare uploadedBy: string | null;
  /** Set when the file was removed from the shot (its bytes and row stay for the record). */
  declare removedAt: CreationOptional<Date | null>;
  declare removedBy: CreationOptional<string | null>;
  declare uploadedAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class Analysis extends Model<InferAttributes<Analysis>, InferCreationAttributes<Analysis>> {
  declare id: CreationOptional<string>;
  declare labId: string;
  declare shotId: string;
  declare version: number;
  declare parameters: unknown;
  declare engineVersion: string;
  declare state: CreationOptional<'queued' | 'running' | 'done' | 'failed'>;
  declare results: CreationOptional<object | null>;
  declare error: CreationOptional<string | null>;
  declare jobKey: string;
  declare requestedBy: string | null;
  declare progress: CreationOptional<number>;
  declare captureIds: CreationOptional<string[]>;
  /** The batch recompute that made this version (null for single recomputes and automatic analyses). */
  declare batchId: CreationOptional<string | null>;
  /** The shot's current version when the batch made this one: the "before" of the batch's table. */
  declare previousAnalysisId: CreationOptional<string | null>;
  declare startedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare completedAt: CreationOptional<Date | null>;
  /** "I checked the time base" on a version marked "check the time base": who, when and what they checked. */
  declare timeBaseConfirmedBy: CreationOptional<string | null>;
  declare timeBaseConfirmedAt: CreationOptional<Date | null>;
  declare timeBaseConfirmationNote: CreationOptional<string | null>;
}

export interface SkippedShot { shotId: string; number: number; reason: string }

export class AnalysisBatch extends Model<InferAttributes<AnalysisBatch>, InferCreationAttributes<AnalysisBatch>> {
  declare id: CreationOptional<string>;
  declare labId: string;
  declare campaignId: string;
  declare settings: Record<string, unknown>;
  declare shotIds: string[];
  declare skipped: CreationOptional<SkippedShot[]>;
  declare requestedBy: string | null;
  declare createdAt: CreationOptional<Date>;
}

export class Review extends Model<InferAttributes<Review>, InferCreationAttributes<Review>> {
  declare id: CreationOptional<string>;
  declare labId: string;
  declare shotId: string;
  declare analysisId: string;
  declare reviewerId: string | null;
  declare decision: 'approved' | 'returned';
  declare comment: CreationOptional<string>;
  declare requestId: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
}

export class ReviewRequest extends Model<InferAttributes<ReviewRequest>, InferCreationAttributes<ReviewRequest>> {
  declare id: CreationOptional<string>;
  declare labId: string;
  declare shotId: string;
  declare analysisId: string;
  declare requestedBy: string | null;
  declare message: CreationOptional<string>;
  declare createdAt: CreationOptional<Date>;
}

export class ShotComment extends Model<InferAttributes<ShotComment>, InferCreationAttributes<ShotComment>> {
  declare id: CreationOptional<string>;
  declare labId: string;
  declare shotId: string;
  declare authorId: string | null;
  declare body: string;
  declare replyTo: string | null;
  declare createdAt: CreationOptional<Date>;
}

export class NotificationPreference extends Model<InferAttributes<NotificationPreference>, InferCreationAttributes<NotificationPreference>> {
  declare userId: string;
  declare reviewRequested: CreationOptional<boolean>;
  declare approved: CreationOptional<boolean>;
  declare returned: CreationOptional<boolean>;
  declare jobFailed: CreationOptional<boolean>;
  declare updatedAt: CreationOptional<Date>;
}

export class AuditEvent extends Model<InferAttributes<AuditEvent>, InferCreationAttributes<AuditEvent>> {
  declare id: CreationOptional<string>;
  declare labId: string | null;
  declare actorId: string | null;
  declare action: string;
  declare targetType: string | null;
  declare targetId: string | null;
  declare details: CreationOptional<Record<string, unknown>>;
  declare ip: string | null;
  declare createdAt: CreationOptional<Date>;
}

const id = { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 };
const uuid = (allowNull = false) => ({ type: DataTypes.UUID, allowNull });
const text = (allowNull = false) => ({ type: DataTypes.TEXT, allowNull });
// Same default as the column's DEFAULT in the migration: without it Sequelize sends NULL and its own notNull check
// fails before PostgreSQL could fill the default in.
const textOr = (defaultValue: string) => ({ type: DataTypes.TEXT, allowNull: false, defaultValue });
const double = (allowNull = false) => ({ type: DataTypes.DOUBLE, allowNull });
const date = (allowNull = true) => ({ type: DataTypes.DATE, allowNull });
const json = (allowNull = true) => ({ type: DataTypes.JSONB, allowNull });
const stamps = { createdAt: DataTypes.DATE, updatedAt: DataTypes.DATE };

export function initModels(sequelize: Sequelize): void {
  const opts = (tableName: string, extra: object = {}) => ({ sequelize, tableName, underscored: true, ...extra });
  Lab.init({ id, name: text(), slug: text(), ...stamps }, opts('labs'));
  User.init(
    {
      id, email: text(), name: text(), passwordHash: text(), disabledAt: date(), disabledBy: uuid(true),
      sessionGeneration: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 }, ...stamps,
    },
    opts('users'),
  );
  PasswordReset.init(
    { id, userId: uuid(), tokenHash: text(), expiresAt: date(false), usedAt: date(), requestedIp: text(true), createdAt: DataTypes.DATE },
    opts('password_resets', { updatedAt: false }),
  );
  Membership.init({ id, labId: uuid(), userId: uuid(), role: text(), ...stamps }, opts('memberships'));
  ApiToken.init(
    {
      id, userId: uuid(), name: text(), tokenHash: text(), tokenPrefix: text(), expiresAt: date(),
      lastUsedAt: date(), revokedAt: date(), createdAt: DataTypes.DATE,
    },
    opts('api_tokens', { updatedAt: false }),
  );
  Invitation.init(
    {
      id, labId: uuid(), email: text(), role: text(), tokenHash: text(), invitedBy: uuid(true),
      expiresAt: date(false), acceptedAt: date(), acceptedBy: uuid(true), revokedAt: date(), createdAt: DataTypes.DATE,
    },
    opts('invitations', { updatedAt: false }),
  );
  Campaign.init(
    {
      id, labId: uuid(), name: text(), description: textOr(''), startedOn: { type: DataTypes.DATEONLY },
      tubeLengthM: double(true), boreM: double(true), analysisSettings: json(), createdBy: uuid(true), ...stamps,
    },
    opts('campaigns'),
  );
  Projectile.init(
    {
      id, labId: uuid(), name: text(), material: textOr(''), diameterM: double(), diameterToleranceM: double(),
      massKg: double(), massToleranceKg: double(), notes: textOr(''), ...stamps,
    },
    opts('projectiles'),
  );
  GateRig.init(
    { id, labId: uuid(), name: text(), gates: json(false), beamWidthM: double(), sensorType: text(), notes: textOr(''), ...stamps },
    opts('gate_rigs'),
  );
  Shot.init(
    {
      id, labId: uuid(), campaignId: uuid(), number: { type: DataTypes.INTEGER, allowNull: false }, firedAt: date(),
      projectileId: uuid(true), gateRigId: uuid(true), tubePressurePa: double(true), sealType: textOr(''),
      ambientTemperatureK: double(true), ambientPressurePa: double(true), notes: textOr(''), status: textOr('draft'),
      currentAnalysisId: uuid(true), reviewAnalysisId: uuid(true), approvedAnalysisId: uuid(true),
      deletedAt: date(), deletedBy: uuid(true), createdBy: uuid(true), ...stamps,
    },
    opts('shots'),
  );
  Capture.init(
    {
      id, labId: uuid(), shotId: uuid(), fileName: text(), sizeBytes: { type: DataTypes.BIGINT, allowNull: false },
      sha256: text(), storageKey: text(), state: textOr('queued'), error: text(true), layout: json(), channels: json(),
      sampleCount: { type: DataTypes.BIGINT }, timeBase: json(),
      importOptions: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
      ingestAttempt: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
      progress: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      warnings: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
      uploadedBy: uuid(true), removedAt: date(), removedBy: uuid(true),
      uploadedAt: DataTypes.DATE, updatedAt: DataTypes.DATE,
    },
    opts('captures', { createdAt: 'uploadedAt' }),
  );
  Analysis.init(
    {
      id, labId: uuid(), shotId: uuid(), version: { type: DataTypes.INTEGER, allowNull: false }, parameters: json(false),
      engineVersion: text(), state: textOr('queued'), results: json(), error: text(true), jobKey: text(), requestedBy: uuid(true),
      progress: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      captureIds: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
      batchId: uuid(true), previousAnalysisId: uuid(true),
      startedAt: date(), createdAt: DataTypes.DATE, completedAt: date(),
      timeBaseConfirmedBy: uuid(true), timeBaseConfirmedAt: date(), timeBaseConfirmationNote: text(true),
    },
    opts('analyses', { updatedAt: false }),
  );
  AnalysisBatch.init(
    {
      id, labId: uuid(), campaignId: uuid(), settings: json(false), shotIds: json(false),
      skipped: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] }, requestedBy: uuid(true), createdAt: DataTypes.DATE,
    },
    opts('analysis_batches', { updatedAt: false }),
  );
  Review.init(
    {
      id, labId: uuid(), shotId: uuid(), analysisId: uuid(), reviewerId: uuid(true), decision: text(), comment: textOr(''),
      requestId: uuid(true), createdAt: DataTypes.DATE,
    },
    opts('reviews', { updatedAt: false }),
  );
  ReviewRequest.init(
    { id, labId: uuid(), shotId: uuid(), analysisId: uuid(), requestedBy: uuid(true), message: textOr(''), createdAt: DataTypes.DATE },
    opts('review_requests', { updatedAt: false }),
  );
  ShotComment.init(
    { id, labId: uuid(), shotId: uuid(), authorId: uuid(true), body: text(), replyTo: uuid(true), createdAt: DataTypes.DATE },
    opts('shot_comments', { updatedAt: false }),
  );
  // A new object per attribute: Sequelize writes the column name into the definition it is given.
  const on = () => ({ type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true });
  NotificationPreference.init(
    {
      userId: { type: DataTypes.UUID, primaryKey: true }, reviewRequested: on(), approved: on(), returned: on(), jobFailed: on(),
      updatedAt: DataTypes.DATE,
    },
    opts('notification_preferences', { createdAt: false }),
  );
  AuditEvent.init(
    {
      id: { type: DataTypes.BIGINT, primaryKey: true, autoIncrement: true }, labId: uuid(true), actorId: uuid(true),
      action: text(), targetType: text(true), targetId: text(true), details: json(false), ip: text(true),
      createdAt: DataTypes.DATE,
    },
    opts('audit_events', { updatedAt: false }),
  );

  Lab.hasMany(Membership, { foreignKey: 'labId' });
  Membership.belongsTo(Lab, { foreignKey: 'labId' });
  User.hasMany(Membership, { foreignKey: 'userId' });
  Membership.belongsTo(User, { foreignKey: 'userId' });
  User.hasMany(ApiToken, { foreignKey: 'userId' });
  // authenticate.ts loads a token together with its user.
  ApiToken.belongsTo(User, { foreignKey: 'userId' });
  PasswordReset.belongsTo(User, { foreignKey: 'userId' });
  Lab.hasMany(Invitation, { foreignKey: 'labId' });
  Lab.hasMany(Campaign, { foreignKey: 'labId' });
  Campaign.hasMany(Shot, { foreignKey: 'campaignId' });
  Shot.belongsTo(Campaign, { foreignKey: 'campaignId' });
  Shot.belongsTo(Projectile, { foreignKey: 'projectileId' });
  Shot.belongsTo(GateRig, { foreignKey: 'gateRigId' });
  Shot.hasMany(Capture, { foreignKey: 'shotId' });
  Shot.hasMany(Analysis, { foreignKey: 'shotId' });
  Shot.hasMany(Review, { foreignKey: 'shotId' });
}
