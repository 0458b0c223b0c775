import { DataTypes, Model, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** A fixed-window counter, keyed like "signin:email:a@b.c". */
export class RateLimit extends Model<InferAttributes<RateLimit>, InferCreationAttributes<RateLimit>> {
  declare key: string;
  declare windowStart: number;
  declare count: number;

  static initModel(sequelize: Sequelize) {
    RateLimit.init(
      {
        key: { type: DataTypes.STRING(300), primaryKey: true },
        windowStart: { type: DataTypes.BIGINT, allowNull: false },
        count: { type: DataTypes.INTEGER, allowNull: false },
      },
      { sequelize, tableName: 'rate_limits', modelName: 'RateLimit', timestamps: false },
    );
  }
}
