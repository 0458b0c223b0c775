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

/** A bundle sent by e-mail: what was sent (array revision and bundle options), to whom, and until when the link works. */
export class Handoff extends Model<InferAttributes<Handoff>, InferCreationAttributes<Handoff>> {
  declare id: CreationOptional<number>;
  declare teamId: ForeignKey<Team['id']>;
  declare arrayId: ForeignKey<ArrayDesign['id']>;
  declare arrayRevision: number;
  declare options: Record<string, unknown>;
  declare recipientEmail: string;
  declare note: string | null;
  declare sentById: ForeignKey<User['id']> | null;
  declare expiresAt: Date;
  declare downloadCount: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Handoff.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        arrayRevision: { type: DataTypes.INTEGER, allowNull: false },
        options: { type: DataTypes.JSON, allowNull: false },
        recipientEmail: { type: DataTypes.STRING(254), allowNull: false },
        note: { type: DataTypes.TEXT, allowNull: true },
        expiresAt: { type: DataTypes.DATE, allowNull: false },
        downloadCount: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        createdAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'handoffs', modelName: 'Handoff', updatedAt: false },
    );
  }
}
