import type { QueryInterface } from 'sequelize';

/**
 * Postgres only: a run's result (a JSONB document of up to about 0.6 MB when it carries
 * spectra, stored as base64 float64 text that barely compresses) is moved out of line
 * uncompressed (STORAGE EXTERNAL) instead of first going through pglz. Measured with
 * `npm run scale:check` (statement log): the UPDATE that stores a result was the largest
 * share of Postgres's time per job. Nothing changes on SQLite (no TOAST there).
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  if (qi.sequelize.getDialect() !== 'postgres') return;
  await qi.sequelize.query('ALTER TABLE estimate_runs ALTER COLUMN result SET STORAGE EXTERNAL');
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  if (qi.sequelize.getDialect() !== 'postgres') return;
  await qi.sequelize.query('ALTER TABLE estimate_runs ALTER COLUMN result SET STORAGE EXTENDED');
}
