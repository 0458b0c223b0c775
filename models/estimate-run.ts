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
import type { Dataset } from './dataset';
import type { Team } from './team';
import type { User } from './user';

export const runStatuses = ['queued', 'running', 'done', 'failed', 'cancelled'] as const;
export type RunStatus = (typeof runStatuses)[number];

/**
 * One estimate run with its exact inputs (array revision, dataset checksum,
 * options, software version) so that it can be re-run and compared.
 */
export class EstimateRun extends Model<InferAttributes<EstimateRun>, InferCreationAttributes<EstimateRun>> {
  declare id: CreationOptional<number>;
  declare teamId: ForeignKey<Team['id']>;
  declare status: RunStatus;
  declare progress: CreationOptional<number>;
  declare datasetId: ForeignKey<Dataset['id']> | null;
  declare datasetSha256: string | null;
  declare arrayRevisionId: ForeignKey<ArrayRevision['id']> | null;
  declare inputs: Record<string, unknown>;
  declare result: CreationOptional<Record<string, unknown> | null>;
  declare error: CreationOptional<string | null>;
  declare softwareVersion: string;
  declare createdById: ForeignKey<User['id']> | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    EstimateRun.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        status: { type: DataTypes.STRING(12), allowNull: false },
        progress: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
        datasetSha256: { type: DataTypes.STRING(64), allowNull: true },
        inputs: { type: DataTypes.JSON, allowNull: false },
        result: { type: DataTypes.JSON, allowNull: true },
        error: { type: DataTypes.TEXT, allowNull: true },
        softwareVersion: { type: DataTypes.STRING(40), allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'estimate_runs', modelName: 'EstimateRun' },
    );
  }
}
