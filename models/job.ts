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

export const jobStatuses = ['queued', 'running', 'done', 'failed', 'cancelled'] as const;
export type JobStatus = (typeof jobStatuses)[number];

/** One durable job of lib/jobs (migration 0004). `inputRef` names the kind's own input row or file. */
export class Job extends Model<InferAttributes<Job>, InferCreationAttributes<Job>> {
  declare id: CreationOptional<number>;
  declare kind: string;
  declare inputRef: string;
  declare teamId: ForeignKey<Team['id']> | null;
  declare ownerId: ForeignKey<User['id']> | null;
  declare status: JobStatus;
  declare progress: CreationOptional<number>;
  declare attempts: CreationOptional<number>;
  declare maxAttempts: CreationOptional<number>;
  declare leaseOwner: CreationOptional<string | null>;
  declare leaseExpiresAt: CreationOptional<Date | null>;
  declare heartbeatAt: CreationOptional<Date | null>;
  declare error: CreationOptional<string | null>;
  declare startedAt: CreationOptional<Date | null>;
  declare finishedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Job.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        kind: { type: DataTypes.STRING(40), allowNull: false },
        inputRef: { type: DataTypes.STRING(200), allowNull: false },
        status: { type: DataTypes.STRING(12), allowNull: false },
        progress: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
        attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        maxAttempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 3 },
        leaseOwner: { type: DataTypes.STRING(120), allowNull: true },
        leaseExpiresAt: { type: DataTypes.DATE, allowNull: true },
        heartbeatAt: { type: DataTypes.DATE, allowNull: true },
        error: { type: DataTypes.TEXT, allowNull: true },
        startedAt: { type: DataTypes.DATE, allowNull: true },
        finishedAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'jobs', modelName: 'Job' },
    );
  }
}
