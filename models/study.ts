import {
  DataTypes,
  Model,
  type CreationOptional,
  type ForeignKey,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { ArrayRevision } from './array-revision';
import type { Team } from './team';
import type { User } from './user';

export const studyStatuses = ['queued', 'running', 'done', 'failed', 'cancelled'] as const;
export type StudyStatus = (typeof studyStatuses)[number];

/**
 * One Monte Carlo accuracy study: its validated inputs (scenario, sweep,
 * methods, trials, seed), progress while it runs on the job queue, and the
 * per-point result of lib/studies/monte-carlo.ts when done.
 */
export class Study extends Model<InferAttributes<Study>, InferCreationAttributes<Study>> {
  declare id: CreationOptional<number>;
  declare teamId: ForeignKey<Team['id']>;
  declare name: string;
  declare status: StudyStatus;
  declare progress: CreationOptional<number>;
  declare arrayRevisionId: ForeignKey<ArrayRevision['id']> | null;
  declare inputs: Record<string, unknown>;
  declare result: CreationOptional<Record<string, unknown> | null>;
  declare error: CreationOptional<string | null>;
  declare softwareVersion: string;
  declare createdById: ForeignKey<User['id']> | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Study.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        name: { type: DataTypes.STRING(200), allowNull: false },
        status: { type: DataTypes.STRING(12), allowNull: false },
        progress: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
        inputs: { type: DataTypes.JSON, allowNull: false },
        result: { type: DataTypes.JSON, allowNull: true },
        error: { type: DataTypes.TEXT, allowNull: true },
        softwareVersion: { type: DataTypes.STRING(40), allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'studies', modelName: 'Study' },
    );
  }
}
