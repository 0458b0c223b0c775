import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Durable jobs (lib/jobs): one row per unit of background work of any kind
 * (estimate, study, dataset parse, …), claimed with a lease that the running
 * process renews; a lease that runs out means the process died.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('jobs', {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true, allowNull: false },
    kind: { type: DataTypes.STRING(40), allowNull: false },
    inputRef: { type: DataTypes.STRING(200), allowNull: false },
    teamId: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'teams', key: 'id' },
      onDelete: 'CASCADE',
    },
    ownerId: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'users', key: 'id' },
      onDelete: 'SET NULL',
    },
    status: { type: DataTypes.STRING(12), allowNull: false },
    progress: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
    attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    maxAttempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 3 },
    leaseOwner: { type: DataTypes.STRING(120), allowNull: true },
    leaseExpiresAt: { type: DataTypes.DATE, allowNull: true },
    heartbeatAt: { type: DataTypes.DATE, allowNull: true },
    error: { type: DataTypes.TEXT, allowNull: true },
    startedAt: { type: DataTypes.DATE, allowNull: true },
    finishedAt: { type: DataTypes.DATE, allowNull: true },
    createdAt: { type: DataTypes.DATE, allowNull: false },
    updatedAt: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('jobs', ['status', 'id']);
  await qi.addIndex('jobs', ['kind', 'inputRef']);
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.dropTable('jobs');
}
