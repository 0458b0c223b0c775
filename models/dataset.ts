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
import type { Team } from './team';
import type { User } from './user';

/** An uploaded snapshot file. The bytes live under the data folder at `storagePath`; `sha256` is of the bytes as received. */
export class Dataset extends Model<InferAttributes<Dataset>, InferCreationAttributes<Dataset>> {
  declare id: CreationOptional<number>;
  declare teamId: ForeignKey<Team['id']>;
  declare name: string;
  declare format: 'csv' | 'npy' | 'hdf5' | 'wav';
  declare elements: number;
  declare snapshots: number;
  declare sha256: string;
  declare bytes: number;
  declare originalName: string;
  declare storagePath: string;
  declare arrayId: ForeignKey<ArrayDesign['id']> | null;
  declare options: CreationOptional<Record<string, unknown> | null>;
  declare details: CreationOptional<Record<string, unknown> | null>;
  declare uploadedById: ForeignKey<User['id']> | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Dataset.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        name: { type: DataTypes.STRING(200), allowNull: false },
        format: { type: DataTypes.STRING(8), allowNull: false },
        elements: { type: DataTypes.INTEGER, allowNull: false },
        snapshots: { type: DataTypes.INTEGER, allowNull: false },
        sha256: { type: DataTypes.STRING(64), allowNull: false },
        bytes: { type: DataTypes.BIGINT, allowNull: false },
        originalName: { type: DataTypes.STRING(255), allowNull: false },
        storagePath: { type: DataTypes.STRING(400), allowNull: false },
        options: { type: DataTypes.JSON, allowNull: true },
        details: { type: DataTypes.JSON, allowNull: true },
        createdAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'datasets', modelName: 'Dataset', updatedAt: false },
    );
  }
}
