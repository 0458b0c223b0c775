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
import type { User } from './user';

/**
 * One immutable saved state of an array. `config` is the validated array
 * input (lib/validations/array.ts); the geometry columns repeat what the
 * engine needs so runs and queries need not re-derive it.
 */
export class ArrayRevision extends Model<InferAttributes<ArrayRevision>, InferCreationAttributes<ArrayRevision>> {
  declare id: CreationOptional<number>;
  declare arrayId: ForeignKey<ArrayDesign['id']>;
  declare revision: number;
  declare authorId: ForeignKey<User['id']> | null;
  declare config: Record<string, unknown>;
  declare elements: number;
  declare spacingWavelengths: number;
  declare frequencyHz: number | null;
  declare propagationSpeedMps: number | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    ArrayRevision.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        revision: { type: DataTypes.INTEGER, allowNull: false },
        config: { type: DataTypes.JSON, allowNull: false },
        elements: { type: DataTypes.INTEGER, allowNull: false },
        spacingWavelengths: { type: DataTypes.DOUBLE, allowNull: false },
        frequencyHz: { type: DataTypes.DOUBLE, allowNull: true },
        propagationSpeedMps: { type: DataTypes.DOUBLE, allowNull: true },
        createdAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'array_revisions', modelName: 'ArrayRevision', updatedAt: false },
    );
  }
}
