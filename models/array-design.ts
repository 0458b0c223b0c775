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

/** A named array of one team. Its geometry lives in immutable ArrayRevision rows. */
export class ArrayDesign extends Model<InferAttributes<ArrayDesign>, InferCreationAttributes<ArrayDesign>> {
  declare id: CreationOptional<number>;
  declare teamId: ForeignKey<Team['id']>;
  declare name: string;
  declare latestRevision: number;
  declare createdById: ForeignKey<User['id']> | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    ArrayDesign.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        name: { type: DataTypes.STRING(120), allowNull: false },
        latestRevision: { type: DataTypes.INTEGER, allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'arrays', modelName: 'ArrayDesign' },
    );
  }
}
