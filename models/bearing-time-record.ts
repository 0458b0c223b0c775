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

export const bearingTimeRecordStatuses = ['queued', 'running', 'done', 'failed', 'cancelled'] as const;
export type BearingTimeRecordStatus = (typeof bearingTimeRecordStatuses)[number];

/**
 * One bearing–time record of a stored recording: the validated request and the
 * resolved analysis options (`inputs`), progress while it runs on the job queue,
 * and when done the tracks and a summary (`summary`) plus the folder of result
 * files under the data folder (`resultPath`: per-block bearings, image rows, the
 * display grid). See lib/data/bearing-time-records.ts.
 */
export class BearingTimeRecord extends Model<
  InferAttributes<BearingTimeRecord>,
  InferCreationAttributes<BearingTimeRecord>
> {
  declare id: CreationOptional<number>;
  declare teamId: ForeignKey<Team['id']>;
  declare name: string;
  declare status: BearingTimeRecordStatus;
  declare progress: CreationOptional<number>;
  declare datasetId: ForeignKey<Dataset['id']> | null;
  declare datasetSha256: string;
  declare arrayRevisionId: ForeignKey<ArrayRevision['id']> | null;
  declare inputs: Record<string, unknown>;
  declare summary: CreationOptional<Record<string, unknown> | null>;
  declare resultPath: CreationOptional<string | null>;
  declare error: CreationOptional<string | null>;
  declare softwareVersion: string;
  declare createdById: ForeignKey<User['id']> | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    BearingTimeRecord.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        name: { type: DataTypes.STRING(200), allowNull: false },
        status: { type: DataTypes.STRING(12), allowNull: false },
        progress: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
        datasetSha256: { type: DataTypes.STRING(64), allowNull: false },
        inputs: { type: DataTypes.JSON, allowNull: false },
        summary: { type: DataTypes.JSON, allowNull: true },
        resultPath: { type: DataTypes.STRING(400), allowNull: true },
        error: { type: DataTypes.TEXT, allowNull: true },
        softwareVersion: { type: DataTypes.STRING(40), allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'bearing_time_records', modelName: 'BearingTimeRecord' },
    );
  }
}
