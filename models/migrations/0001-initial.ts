import { DataTypes, type QueryInterface } from 'sequelize';
import { jsonType } from './types';

/** Teams, users, API tokens, one-time links, audit events, captured mail, rate-limit buckets. */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  const id = { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true, allowNull: false };
  const ts = { type: DataTypes.DATE, allowNull: false };

  await qi.createTable('teams', {
    id,
    name: { type: DataTypes.STRING(120), allowNull: false },
    settings: { type: jsonType(qi), allowNull: false, defaultValue: '{}' },
    createdAt: ts,
    updatedAt: ts,
  });

  await qi.createTable('users', {
    id,
    email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
    name: { type: DataTypes.STRING(120), allowNull: false },
    passwordHash: { type: DataTypes.STRING(100), allowNull: false },
    role: { type: DataTypes.STRING(16), allowNull: false },
    teamId: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'teams', key: 'id' },
      onDelete: 'CASCADE',
    },
    createdAt: ts,
    updatedAt: ts,
  });
  await qi.addIndex('users', ['teamId']);

  await qi.createTable('api_tokens', {
    id,
    userId: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'users', key: 'id' },
      onDelete: 'CASCADE',
    },
    name: { type: DataTypes.STRING(80), allowNull: false },
    tokenHash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    prefix: { type: DataTypes.STRING(16), allowNull: false },
    lastUsedAt: { type: DataTypes.DATE, allowNull: true },
    revokedAt: { type: DataTypes.DATE, allowNull: true },
    createdAt: ts,
  });
  await qi.addIndex('api_tokens', ['userId']);

  await qi.createTable('auth_links', {
    id,
    purpose: { type: DataTypes.STRING(16), allowNull: false },
    email: { type: DataTypes.STRING(254), allowNull: false },
    tokenHash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    teamId: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'teams', key: 'id' },
      onDelete: 'CASCADE',
    },
    role: { type: DataTypes.STRING(16), allowNull: true },
    createdById: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'users', key: 'id' },
      onDelete: 'SET NULL',
    },
    expiresAt: { type: DataTypes.DATE, allowNull: false },
    usedAt: { type: DataTypes.DATE, allowNull: true },
    revokedAt: { type: DataTypes.DATE, allowNull: true },
    createdAt: ts,
  });
  await qi.addIndex('auth_links', ['teamId', 'purpose']);

  await qi.createTable('audit_events', {
    id,
    teamId: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'teams', key: 'id' },
      onDelete: 'CASCADE',
    },
    userId: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'users', key: 'id' },
      onDelete: 'SET NULL',
    },
    action: { type: DataTypes.STRING(64), allowNull: false },
    target: { type: DataTypes.STRING(200), allowNull: true },
    detail: { type: jsonType(qi), allowNull: true },
    createdAt: ts,
  });
  await qi.addIndex('audit_events', ['teamId', 'createdAt']);

  await qi.createTable('outbox_messages', {
    id,
    to: { type: DataTypes.TEXT, allowNull: false },
    from: { type: DataTypes.TEXT, allowNull: false },
    subject: { type: DataTypes.TEXT, allowNull: false },
    text: { type: DataTypes.TEXT, allowNull: false },
    html: { type: DataTypes.TEXT, allowNull: true },
    receivedAt: ts,
  });

  await qi.createTable('rate_limits', {
    key: { type: DataTypes.STRING(300), primaryKey: true, allowNull: false },
    windowStart: { type: DataTypes.BIGINT, allowNull: false },
    count: { type: DataTypes.INTEGER, allowNull: false },
  });
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  for (const table of [
    'rate_limits',
    'outbox_messages',
    'audit_events',
    'auth_links',
    'api_tokens',
    'users',
    'teams',
  ]) {
    await qi.dropTable(table);
  }
}
