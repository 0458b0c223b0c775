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
import type { User } from './user';

export class AuditEvent extends Model<InferAttributes<AuditEvent>, InferCreationAttributes<AuditEvent>> {
  declare id: CreationOptional<number>;
  declare teamId: ForeignKey<Team['id']>;
  declare userId: ForeignKey<User['id']> | null;
  declare action: string;
  declare target: CreationOptional<string | null>;
  declare detail: CreationOptional<Record<string, unknown> | null>;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    AuditEvent.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        action: { type: DataTypes.STRING(64), allowNull: false },
        target: { type: DataTypes.STRING(200), allowNull: true },
        detail: { type: DataTypes.JSON, allowNull: true },
        createdAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'audit_events', modelName: 'AuditEvent', updatedAt: false },
    );
  }
}
