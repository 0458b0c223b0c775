import {
  DataTypes,
  Model,
  type CreationOptional,
  type ForeignKey,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { ArrayDesign } from './array-design';
import type { ArrayRevision } from './array-revision';
import type { Team } from './team';
import type { User } from './user';

export const calibrationStatuses = ['queued', 'running', 'done', 'failed', 'cancelled'] as const;
export type CalibrationStatus = (typeof calibrationStatuses)[number];

/**
 * One calibration of an array from reference recordings: the validated request and
 * what it resolved to (`inputs`), progress while its job runs, the element states and
 * report when done (`result`), and the revision created from it once accepted.
 */
export class Calibration extends Model<InferAttributes<Calibration>, InferCreationAttributes<Calibration>> {
  declare id: CreationOptional<number>;
  declare teamId: ForeignKey<Team['id']>;
  declare arrayId: ForeignKey<ArrayDesign['id']>;
  declare baseRevisionId: ForeignKey<ArrayRevision['id']> | null;
  declare revisionId: CreationOptional<ForeignKey<ArrayRevision['id']> | null>;
  declare status: CalibrationStatus;
  declare progress: CreationOptional<number>;
  declare inputs: Record<string, unknown>;
  declare result: CreationOptional<Record<string, unknown> | null>;
  declare error: CreationOptional<string | null>;
  declare softwareVersion: string;
  declare createdById: ForeignKey<User['id']> | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Calibration.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        status: { type: DataTypes.STRING(12), allowNull: false },
        progress: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
        inputs: { type: DataTypes.JSON, allowNull: false },
        result: { type: DataTypes.JSON, allowNull: true },
        error: { type: DataTypes.TEXT, allowNull: true },
        softwareVersion: { type: DataTypes.STRING(40), allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'calibrations', modelName: 'Calibration' },
    );
  }
}
