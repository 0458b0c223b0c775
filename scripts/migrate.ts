/* Applies pending migrations to the database at STEERWISE_DB (default data/steerwise.sqlite). */
import { applyPragmas, createSequelize, describeTarget } from '@/lib/db/open';
import { dbTarget } from '@/lib/env';
import { migrateUp } from '@/lib/db/migrate';

async function main() {
  const file = dbTarget();
  const sequelize = createSequelize(file);
  await applyPragmas(sequelize);
  const applied = await migrateUp(sequelize);
  console.log(
    applied.length
      ? `Applied ${applied.join(', ')} to ${describeTarget(file)}`
      : `Database ${describeTarget(file)} is up to date`,
  );
  await sequelize.close();
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
