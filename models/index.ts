import type { Sequelize } from 'sequelize';
import { Team } from './team';
import { User } from './user';
import { ApiToken } from './api-token';
import { AuthLink } from './auth-link';
import { AuditEvent } from './audit-event';
import { OutboxMessage } from './outbox-message';
import { RateLimit } from './rate-limit';
import { ArrayDesign } from './array-design';
import { ArrayRevision } from './array-revision';
import { Dataset } from './dataset';
import { EstimateRun } from './estimate-run';
import { Review } from './review';
import { Handoff } from './handoff';
import { Study } from './study';
import { Job } from './job';
import { BearingTimeRecord } from './bearing-time-record';
import { Calibration } from './calibration';

export {
  Team,
  User,
  ApiToken,
  AuthLink,
  AuditEvent,
  OutboxMessage,
  RateLimit,
  ArrayDesign,
  ArrayRevision,
  Dataset,
  EstimateRun,
  Review,
  Handoff,
  Study,
  Job,
  BearingTimeRecord,
  Calibration,
};
export type { JobStatus } from './job';
export { jobStatuses } from './job';
export type { StudyStatus } from './study';
export type { BearingTimeRecordStatus } from './bearing-time-record';
export type { CalibrationStatus } from './calibration';
export type { RunStatus } from './estimate-run';
export { runStatuses } from './estimate-run';
export type { ReviewKind } from './review';
export { reviewKinds } from './review';
export type { Role } from './user';
export { roles } from './user';
export type { TeamSettings } from './team';

const initialised = new WeakSet<Sequelize>();

/** Initialises every model on one Sequelize instance, then wires associations (the only place they are wired). */
export function initModels(sequelize: Sequelize): void {
  if (initialised.has(sequelize)) return;
  initialised.add(sequelize);
  Team.initModel(sequelize);
  User.initModel(sequelize);
  ApiToken.initModel(sequelize);
  AuthLink.initModel(sequelize);
  AuditEvent.initModel(sequelize);
  OutboxMessage.initModel(sequelize);
  RateLimit.initModel(sequelize);
  ArrayDesign.initModel(sequelize);
  ArrayRevision.initModel(sequelize);
  Dataset.initModel(sequelize);
  EstimateRun.initModel(sequelize);
  Review.initModel(sequelize);
  Handoff.initModel(sequelize);
  Study.initModel(sequelize);
  Job.initModel(sequelize);
  BearingTimeRecord.initModel(sequelize);
  Calibration.initModel(sequelize);

  Team.hasMany(User, { foreignKey: 'teamId', as: 'members' });
  User.belongsTo(Team, { foreignKey: 'teamId', as: 'team' });
  User.hasMany(ApiToken, { foreignKey: 'userId', as: 'tokens' });
  ApiToken.belongsTo(User, { foreignKey: 'userId', as: 'user' });
  Team.hasMany(AuthLink, { foreignKey: 'teamId', as: 'links' });
  AuthLink.belongsTo(Team, { foreignKey: 'teamId', as: 'team' });
  AuthLink.belongsTo(User, { foreignKey: 'createdById', as: 'createdBy' });
  Team.hasMany(AuditEvent, { foreignKey: 'teamId', as: 'auditEvents' });
  AuditEvent.belongsTo(User, { foreignKey: 'userId', as: 'user' });

  Team.hasMany(ArrayDesign, { foreignKey: 'teamId', as: 'arrays' });
  ArrayDesign.belongsTo(Team, { foreignKey: 'teamId', as: 'team' });
  ArrayDesign.belongsTo(User, { foreignKey: 'createdById', as: 'createdBy' });
  ArrayDesign.hasMany(ArrayRevision, { foreignKey: 'arrayId', as: 'revisions' });
  ArrayRevision.belongsTo(ArrayDesign, { foreignKey: 'arrayId', as: 'array' });
  ArrayRevision.belongsTo(User, { foreignKey: 'authorId', as: 'author' });
  Team.hasMany(Dataset, { foreignKey: 'teamId', as: 'datasets' });
  Dataset.belongsTo(Team, { foreignKey: 'teamId', as: 'team' });
  Dataset.belongsTo(ArrayDesign, { foreignKey: 'arrayId', as: 'array' });
  Dataset.belongsTo(User, { foreignKey: 'uploadedById', as: 'uploadedBy' });
  Team.hasMany(EstimateRun, { foreignKey: 'teamId', as: 'estimateRuns' });
  EstimateRun.belongsTo(Dataset, { foreignKey: 'datasetId', as: 'dataset' });
  EstimateRun.belongsTo(ArrayRevision, { foreignKey: 'arrayRevisionId', as: 'arrayRevision' });
  EstimateRun.belongsTo(User, { foreignKey: 'createdById', as: 'createdBy' });
  ArrayRevision.hasMany(Review, { foreignKey: 'arrayRevisionId', as: 'reviews' });
  EstimateRun.hasMany(Review, { foreignKey: 'estimateRunId', as: 'reviews' });
  Review.belongsTo(ArrayRevision, { foreignKey: 'arrayRevisionId', as: 'arrayRevision' });
  Review.belongsTo(EstimateRun, { foreignKey: 'estimateRunId', as: 'estimateRun' });
  Review.belongsTo(User, { foreignKey: 'authorId', as: 'author' });
  Team.hasMany(Review, { foreignKey: 'teamId', as: 'reviews' });
  Team.hasMany(Handoff, { foreignKey: 'teamId', as: 'handoffs' });
  Handoff.belongsTo(ArrayDesign, { foreignKey: 'arrayId', as: 'array' });
  Handoff.belongsTo(User, { foreignKey: 'sentById', as: 'sentBy' });
  Team.hasMany(Study, { foreignKey: 'teamId', as: 'studies' });
  Study.belongsTo(ArrayRevision, { foreignKey: 'arrayRevisionId', as: 'arrayRevision' });
  Study.belongsTo(User, { foreignKey: 'createdById', as: 'createdBy' });
  Job.belongsTo(User, { foreignKey: 'ownerId', as: 'owner' });
  Team.hasMany(BearingTimeRecord, { foreignKey: 'teamId', as: 'bearingTimeRecords' });
  BearingTimeRecord.belongsTo(Dataset, { foreignKey: 'datasetId', as: 'dataset' });
  BearingTimeRecord.belongsTo(ArrayRevision, { foreignKey: 'arrayRevisionId', as: 'arrayRevision' });
  BearingTimeRecord.belongsTo(User, { foreignKey: 'createdById', as: 'createdBy' });
  Team.hasMany(Calibration, { foreignKey: 'teamId', as: 'calibrations' });
  Calibration.belongsTo(ArrayDesign, { foreignKey: 'arrayId', as: 'array' });
  Calibration.belongsTo(ArrayRevision, { foreignKey: 'baseRevisionId', as: 'baseRevision' });
  Calibration.belongsTo(ArrayRevision, { foreignKey: 'revisionId', as: 'revision' });
  Calibration.belongsTo(User, { foreignKey: 'createdById', as: 'createdBy' });
}
