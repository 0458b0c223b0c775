/*
 * Operator command: restores a backup into an empty data folder.
 *   STEERWISE_DATA_DIR=/srv/steerwise npm run restore -- backups/steerwise-2026-12-04.zip
 * Refuses a damaged or foreign archive, and a folder that is not empty, before writing anything.
 */
import { parseArgs } from 'node:util';
import { restoreBackup } from '@/lib/backup';
import { databaseUrl, dataDir, dbPath } from '@/lib/env';

async function main() {
  if (databaseUrl())
    throw new Error(
      'DATABASE_URL names a Postgres database: back it up with pg_dump (and the file store with its own tools); see the README, "Running for a larger team".',
    );
  const { positionals } = parseArgs({ allowPositionals: true });
  if (positionals.length !== 1) throw new Error('Usage: npm run restore -- <file.zip>');
  const manifest = await restoreBackup({ archive: positionals[0], dataDir: dataDir(), dbFile: dbPath() });
  console.log(
    `Restored ${manifest.files.length - 1} file(s) and the database (taken ${manifest.createdAt}) into ${dataDir()}.`,
  );
}

main().catch((err) => {
  console.error((err as Error).message);
  process.exit(1);
});
