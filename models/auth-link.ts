import {
  DataTypes,
  Model,
  type CreationOptional,
  type ForeignKey,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { Team } from './team';
import type { Role, User } from './user';

export type AuthLinkPurpose = 'invite' | 'reset';

/**
 * A one-time link sent by e-mail: an invitation to join a team, or a
 * password reset. Only the SHA-256 of the link token is stored.
 */
export class AuthLink extends Model<InferAttributes<AuthLink>, InferCreationAttributes<AuthLink>> {
  declare id: CreationOptional<number>;
  declare purpose: AuthLinkPurpose;
  declare email: string;
  declare tokenHash: string;
  declare teamId: ForeignKey<Team['id']>;
  /** The role an invitee receives; null for resets. */
  declare role: CreationOptional<Role | null>;
  declare createdById: ForeignKey<User['id']> | null;
  declare expiresAt: Date;
  declare usedAt: CreationOptional<Date | null>;
  declare revokedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    AuthLink.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        purpose: { type: DataTypes.STRING(16), allowNull: false },
        email: { type: DataTypes.STRING(254), allowNull: false },
        tokenHash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
        role: { type: DataTypes.STRING(16), allowNull: true },
        expiresAt: { type: DataTypes.DATE, allowNull: false },
        usedAt: { type: DataTypes.DATE, allowNull: true },
        revokedAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'auth_links', modelName: 'AuthLink', updatedAt: false },
    );
  }
}
