import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export type TeamSettings = {
  /** Whether viewers may download dataset files (used by the hand-off feature). */
  allowViewerDatasetExport: boolean;
};

export const defaultTeamSettings: TeamSettings = { allowViewerDatasetExport: false };

export class Team extends Model<InferAttributes<Team>, InferCreationAttributes<Team>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare settings: CreationOptional<TeamSettings>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Team.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        name: { type: DataTypes.STRING(120), allowNull: false },
        settings: {
          type: DataTypes.JSON,
          allowNull: false,
          defaultValue: defaultTeamSettings,
          get() {
            const raw = this.getDataValue('settings') as unknown;
            const parsed = typeof raw === 'string' ? JSON.parse(raw) : raw;
            return { ...defaultTeamSettings, ...(parsed ?? {}) };
          },
        },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'teams', modelName: 'Team' },
    );
  }
}
