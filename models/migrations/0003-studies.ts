import { DataTypes, type QueryInterface } from 'sequelize';
import { jsonType } from './types';

/** Monte Carlo accuracy studies (lib/studies), run on the in-process job queue. */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('studies', {
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
    arrayRevisionId: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'array_revisions', key: 'id' },
      onDelete: 'SET NULL',
    },
    inputs: { type: jsonType(qi), allowNull: false },
    result: { type: jsonType(qi), allowNull: true },
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
  await qi.addIndex('studies', ['teamId', 'createdAt']);
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.dropTable('studies');
}
