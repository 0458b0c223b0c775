import 'server-only';
import type { Sequelize } from 'sequelize';
import { applyPragmas, createSequelize } from './open';
import { dbTarget } from '../env';
import { initModels } from '@/models';

/**
 * The app's one Sequelize instance, opened on first use on STEERWISE_DB
 * (default data/steerwise.sqlite) with WAL, foreign keys and a busy timeout.
 * Migrations are applied beforehand by scripts/migrate.ts, never by sync().
 */
type Holder = { sequelize?: Sequelize; ready?: Promise<Sequelize> };
// Kept on globalThis so development hot reloads reuse the connection; keyed
// by file so tests with their own temporary database never share one.
const holders = ((globalThis as Record<string, unknown>).__steerwiseDb ??= new Map<string, Holder>()) as Map<
  string,
  Holder
>;

function holderFor(file: string): Holder {
  let h = holders.get(file);
  if (!h) holders.set(file, (h = {}));
  return h;
}

export function getDb(): Promise<Sequelize> {
  const holder = holderFor(dbTarget());
  if (!holder.ready) {
    const sequelize = createSequelize(dbTarget());
    holder.sequelize = sequelize;
    const ready = applyPragmas(sequelize).then(() => sequelize);
    holder.ready = ready;
    ready.catch(() => {
      if (holder.ready === ready) holder.ready = undefined;
    });
  }
  // Initialise this module copy's model classes on the shared instance (the
  // instrumentation bundle and the app bundle each hold their own copy).
  initModels(holder.sequelize!);
  return holder.ready;
}

/** Closes the connection (tests). */
export async function closeDb(): Promise<void> {
  const holder = holderFor(dbTarget());
  const s = holder.sequelize;
  holder.sequelize = undefined;
  holder.ready = undefined;
  if (s) await s.close();
}
