import { DataTypes, type QueryInterface } from 'sequelize';
import { jsonType } from './types';

/**
 * Arrays with immutable revisions, snapshot datasets, estimate runs and their
 * background jobs, reviews (comments and sign-offs) and e-mailed hand-offs.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  const id = { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true, allowNull: false };
  const ts = { type: DataTypes.DATE, allowNull: false };
  const team = {
    type: DataTypes.INTEGER,
    allowNull: false,
    references: { model: 'teams', key: 'id' },
    onDelete: 'CASCADE',
  };
  const user = (allowNull: boolean) => ({
    type: DataTypes.INTEGER,
    allowNull,
    references: { model: 'users', key: 'id' },
    onDelete: allowNull ? 'SET NULL' : 'CASCADE',
  });

  await qi.createTable('arrays', {
    id,
    teamId: team,
    name: { type: DataTypes.STRING(120), allowNull: false },
    latestRevision: { type: DataTypes.INTEGER, allowNull: false },
    createdById: user(true),
    createdAt: ts,
    updatedAt: ts,
  });
  await qi.addIndex('arrays', ['teamId']);

  await qi.createTable('array_revisions', {
    id,
    arrayId: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'arrays', key: 'id' },
      onDelete: 'CASCADE',
    },
    revision: { type: DataTypes.INTEGER, allowNull: false },
    authorId: user(true),
    config: { type: jsonType(qi), allowNull: false },
    elements: { type: DataTypes.INTEGER, allowNull: false },
    spacingWavelengths: { type: DataTypes.DOUBLE, allowNull: false },
    frequencyHz: { type: DataTypes.DOUBLE, allowNull: true },
    propagationSpeedMps: { type: DataTypes.DOUBLE, allowNull: true },
    createdAt: ts,
  });
  await qi.addIndex('array_revisions', ['arrayId', 'revision'], { unique: true });

  await qi.createTable('datasets', {
    id,
    teamId: team,
    name: { type: DataTypes.STRING(200), allowNull: false },
    format: { type: DataTypes.STRING(8), allowNull: false },
    elements: { type: DataTypes.INTEGER, allowNull: false },
    snapshots: { type: DataTypes.INTEGER, allowNull: false },
    sha256: { type: DataTypes.STRING(64), allowNull: false },
    bytes: { type: DataTypes.BIGINT, allowNull: false },
    originalName: { type: DataTypes.STRING(255), allowNull: false },
    storagePath: { type: DataTypes.STRING(400), allowNull: false },
    arrayId: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'arrays', key: 'id' },
      onDelete: 'SET NULL',
    },
    options: { type: jsonType(qi), allowNull: true },
    details: { type: jsonType(qi), allowNull: true },
    uploadedById: user(true),
    createdAt: ts,
  });
  await qi.addIndex('datasets', ['teamId']);

  await qi.createTable('estimate_runs', {
    id,
    teamId: team,
    status: { type: DataTypes.STRING(12), allowNull: false },
    progress: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
    datasetId: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'datasets', key: 'id' },
      onDelete: 'SET NULL',
    },
    datasetSha256: { type: DataTypes.STRING(64), allowNull: true },
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
    createdById: user(true),
    createdAt: ts,
    updatedAt: ts,
  });
  await qi.addIndex('estimate_runs', ['teamId', 'createdAt']);

  await qi.createTable('reviews', {
    id,
    teamId: team,
    arrayRevisionId: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'array_revisions', key: 'id' },
      onDelete: 'CASCADE',
    },
    estimateRunId: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'estimate_runs', key: 'id' },
      onDelete: 'CASCADE',
    },
    authorId: user(true),
    kind: { type: DataTypes.STRING(24), allowNull: false },
    body: { type: DataTypes.TEXT, allowNull: false },
    createdAt: ts,
  });
  await qi.addIndex('reviews', ['arrayRevisionId']);
  await qi.addIndex('reviews', ['estimateRunId']);

  await qi.createTable('handoffs', {
    id,
    teamId: team,
    arrayId: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'arrays', key: 'id' },
      onDelete: 'CASCADE',
    },
    arrayRevision: { type: DataTypes.INTEGER, allowNull: false },
    options: { type: jsonType(qi), allowNull: false },
    recipientEmail: { type: DataTypes.STRING(254), allowNull: false },
    note: { type: DataTypes.TEXT, allowNull: true },
    sentById: user(true),
    expiresAt: ts,
    downloadCount: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    createdAt: ts,
  });
  await qi.addIndex('handoffs', ['teamId']);
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  for (const table of ['handoffs', 'reviews', 'estimate_runs', 'datasets', 'array_revisions', 'arrays']) {
    await qi.dropTable(table);
  }
}
