import { DataTypes, type QueryInterface } from 'sequelize';

/** Element gain/phase calibrations from reference recordings (lib/doa/calibration), run as jobs of kind 'calibration'. */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('calibrations', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true, allowNull: false },
    teamId: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'teams', key: 'id' },
      onDelete: 'CASCADE',
    },
    arrayId: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'arrays', key: 'id' },
      onDelete: 'CASCADE',
    },
    /** The revision whose geometry the fit used. */
    baseRevisionId: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'array_revisions', key: 'id' },
      onDelete: 'SET NULL',
    },
    /** The revision created from the result (once accepted). */
    revisionId: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'array_revisions', key: 'id' },
      onDelete: 'SET NULL',
    },
    status: { type: DataTypes.STRING(12), allowNull: false },
    progress: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
    inputs: { type: DataTypes.JSON, allowNull: false },
    result: { type: DataTypes.JSON, allowNull: true },
    error: { type: DataTypes.TEXT, allowNull: true },
    softwareVersion: { type: DataTypes.STRING(40), allowNull: false },
    createdById: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'users', key: 'id' },
      onDelete: 'SET NULL',
    },
    createdAt: { type: DataTypes.DATE, allowNull: false },
    updatedAt: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('calibrations', ['teamId', 'arrayId', 'createdAt']);
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.dropTable('calibrations');
}
