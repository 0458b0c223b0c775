/* Seeds the invented demo scenario into STEERWISE_DB. Idempotent. Run after scripts/migrate.ts. */
import { applyPragmas, createSequelize, describeTarget } from '@/lib/db/open';
import { dbTarget } from '@/lib/env';
import { DEMO_PASSWORD, seedDemo } from '@/lib/demo/seed';

async function main() {
  const sequelize = createSequelize(dbTarget());
  await applyPragmas(sequelize);
  const result = await seedDemo(sequelize);
  console.log(
    result.created
      ? `Seeded the demo teams into ${describeTarget(dbTarget())}. Sign in as admin@, engineer@, reviewer@ or viewer@steerwise.test with password "${DEMO_PASSWORD}".`
      : `Demo data already present in ${describeTarget(dbTarget())}; nothing changed.`,
  );
  await sequelize.close();
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
