import type { Sequelize } from 'sequelize';
import { Team } from './team';
import { User } from './user';
import { ApiToken } from './api-token';
import { AuthLink } from './auth-link';
import { AuditEvent } from './audit-event';
import { OutboxMessage } from './outbox-message';
import { RateLimit } from './rate-limit';

export { Team, User, ApiToken, AuthLink, AuditEvent, OutboxMessage, RateLimit };
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

  Team.hasMany(User, { foreignKey: 'teamId', as: 'members' });
  User.belongsTo(Team, { foreignKey: 'teamId', as: 'team' });
  User.hasMany(ApiToken, { foreignKey: 'userId', as: 'tokens' });
  ApiToken.belongsTo(User, { foreignKey: 'userId', as: 'user' });
  Team.hasMany(AuthLink, { foreignKey: 'teamId', as: 'links' });
  AuthLink.belongsTo(Team, { foreignKey: 'teamId', as: 'team' });
  AuthLink.belongsTo(User, { foreignKey: 'createdById', as: 'createdBy' });
  Team.hasMany(AuditEvent, { foreignKey: 'teamId', as: 'auditEvents' });
  AuditEvent.belongsTo(User, { foreignKey: 'userId', as: 'user' });
}
