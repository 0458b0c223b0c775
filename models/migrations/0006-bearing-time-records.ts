import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Bearing–time records of long recordings (lib/doa/wideband), run on the job queue.
 * The bulky result (per-block bearings, the image rows) lives in files under the data
 * folder (`resultPath`); the row keeps the request, the resolved plan, the tracks and a summary.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('bearing_time_records', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true, allowNull: false },
    teamId: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'teams', key: 'id' },
      onDelete: 'CASCADE',
    },
    name: { type: DataTypes.STRING(200), allowNull: false },
    status: { type: DataTypes.STRING(12), allowNull: false },
    progress: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
    datasetId: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'datasets', key: 'id' },
      onDelete: 'SET NULL',
    },
    datasetSha256: { type: DataTypes.STRING(64), allowNull: false },
    arrayRevisionId: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'array_revisions', key: 'id' },
      onDelete: 'SET NULL',
    },
    inputs: { type: DataTypes.JSON, allowNull: false },
    summary: { type: DataTypes.JSON, allowNull: true },
    resultPath: { type: DataTypes.STRING(400), allowNull: true },
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
  await qi.addIndex('bearing_time_records', ['teamId', 'createdAt']);
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.dropTable('bearing_time_records');
}
