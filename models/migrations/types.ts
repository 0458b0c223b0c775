import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Column types that differ by database, for migrations that run on both
 * SQLite and Postgres: JSON documents are JSONB on Postgres (indexable,
 * queryable with ->> and @>) and JSON (text) on SQLite.
 */
export function jsonType(qi: QueryInterface) {
  return qi.sequelize.getDialect() === 'postgres' ? DataTypes.JSONB : DataTypes.JSON;
}
