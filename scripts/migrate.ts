/* Applies pending migrations to the database at STEERWISE_DB (default data/steerwise.sqlite). */
import { applyPragmas, createSequelize } from '@/lib/db/open';
import { dbPath } from '@/lib/env';
import { migrateUp } from '@/lib/db/migrate';

async function main() {
  const file = dbPath();
  const sequelize = createSequelize(file);
  await applyPragmas(sequelize);
  const applied = await migrateUp(sequelize);
  console.log(applied.length ? `Applied ${applied.join(', ')} to ${file}` : `Database ${file} is up to date`);
  await sequelize.close();
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
