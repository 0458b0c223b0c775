/*
 * Operator command: a consistent backup of the data folder while the server runs.
 *   npm run backup -- --out backups/steerwise-2026-12-04.zip
 * The database is copied with VACUUM INTO; stored files and a manifest of SHA-256s go with it.
 */
import { parseArgs } from 'node:util';
import { createBackup } from '@/lib/backup';
import { databaseUrl, dataDir, dbPath } from '@/lib/env';

async function main() {
  if (databaseUrl())
    throw new Error(
      'DATABASE_URL names a Postgres database: back it up with pg_dump (and the file store with its own tools); see the README, "Running for a larger team".',
    );
  const { values } = parseArgs({ options: { out: { type: 'string' } } });
  if (!values.out) throw new Error('Usage: npm run backup -- --out <file.zip>');
  const manifest = await createBackup({ dataDir: dataDir(), dbFile: dbPath(), out: values.out });
  const bytes = manifest.files.reduce((a, f) => a + f.bytes, 0);
  console.log(
    `Backup written to ${values.out}: the database and ${manifest.files.length - 1} file(s), ${(bytes / 1e6).toFixed(1)} MB.`,
  );
}

main().catch((err) => {
  console.error((err as Error).message);
  process.exit(1);
});
