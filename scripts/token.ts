/*
 * Operator command: prints a new API token for a user and nothing else.
 *   npm run --silent token -- --email engineer@steerwise.test [--name "ci runner"]
 * Only the token's SHA-256 is stored. Errors go to stderr with exit code 1.
 */
import { parseArgs } from 'node:util';
import { applyPragmas, createSequelize, describeTarget } from '@/lib/db/open';
import { dbTarget } from '@/lib/env';
import { AuditEvent, ApiToken, User, initModels } from '@/models';
import { randomSecret, sha256Hex } from '@/lib/auth/secrets';

async function main() {
  const { values } = parseArgs({ options: { email: { type: 'string' }, name: { type: 'string' } } });
  const email = values.email?.trim().toLowerCase();
  if (!email) throw new Error('Usage: npm run --silent token -- --email <email> [--name <label>]');
  const sequelize = createSequelize(dbTarget());
  try {
    await applyPragmas(sequelize);
    initModels(sequelize);
    const user = await User.findOne({ where: { email } });
    if (!user) throw new Error(`No user with e-mail ${email} in ${describeTarget(dbTarget())}.`);
    const secret = randomSecret('sw_', 32);
    const name = values.name?.trim() || `operator token ${new Date().toISOString().slice(0, 10)}`;
    await sequelize.transaction(async (transaction) => {
      const token = await ApiToken.create(
        { userId: user.id, name, tokenHash: sha256Hex(secret), prefix: secret.slice(0, 9) },
        { transaction },
      );
      await AuditEvent.create(
        {
          teamId: user.teamId as number,
          userId: null,
          action: 'token.created',
          target: name,
          detail: { tokenId: token.id, prefix: token.prefix, forUserId: user.id, via: 'operator command' },
        },
        { transaction },
      );
    });
    process.stdout.write(`${secret}\n`);
  } finally {
    await sequelize.close();
  }
}

main().catch((err: Error) => {
  process.stderr.write(`${err.message}\n`);
  process.exit(1);
});
