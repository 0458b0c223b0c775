import 'server-only';
import { QueryTypes } from 'sequelize';
import { getDb } from '../db';

/**
 * Persistent fixed-window counters in the rate_limits table, so limits hold
 * across restarts and across server processes sharing the database.
 */
export async function countHit({
  key,
  windowMs,
  now = Date.now(),
}: {
  key: string;
  windowMs: number;
  now?: number;
}): Promise<number> {
  const db = await getDb();
  const upsert = `INSERT INTO rate_limits ("key", "windowStart", "count") VALUES (:key, :now, 1)
     ON CONFLICT("key") DO UPDATE SET
       "count" = CASE WHEN rate_limits."windowStart" <= :expired THEN 1 ELSE rate_limits."count" + 1 END,
       "windowStart" = CASE WHEN rate_limits."windowStart" <= :expired THEN :now ELSE rate_limits."windowStart" END`;
  const replacements = { key, now, expired: now - windowMs };
  if (db.getDialect() === 'postgres') {
    // One statement: the upsert locks the row and RETURNING gives this hit's own count (a later SELECT could see others').
    const rows = await db.query<{ count: number }>(`${upsert} RETURNING "count"`, {
      replacements,
      type: QueryTypes.SELECT,
    });
    return Number(rows[0]?.count ?? 1);
  }
  // SQLite: one writer at a time holds the file lock from the upsert through the read.
  return db.transaction(async (transaction) => {
    await db.query(upsert, { replacements, transaction });
    const rows = await db.query<{ count: number }>(`SELECT "count" FROM rate_limits WHERE "key" = :key`, {
      replacements: { key },
      type: QueryTypes.SELECT,
      transaction,
    });
    return Number(rows[0]?.count ?? 1);
  });
}

export async function currentCount({
  key,
  windowMs,
  now = Date.now(),
}: {
  key: string;
  windowMs: number;
  now?: number;
}): Promise<{ count: number; retryAfterSec: number }> {
  const db = await getDb();
  const rows = await db.query<{ count: number; windowStart: number }>(
    `SELECT "count", "windowStart" FROM rate_limits WHERE "key" = :key`,
    { replacements: { key }, type: QueryTypes.SELECT },
  );
  const row = rows[0];
  if (!row || Number(row.windowStart) <= now - windowMs) return { count: 0, retryAfterSec: 0 };
  return {
    count: Number(row.count),
    retryAfterSec: Math.max(1, Math.ceil((Number(row.windowStart) + windowMs - now) / 1000)),
  };
}

export async function clearKey(key: string): Promise<void> {
  const db = await getDb();
  await db.query(`DELETE FROM rate_limits WHERE "key" = :key`, { replacements: { key } });
}

/** Sign-in limits: failed attempts per e-mail and per client address in a 15-minute window. */
export const signInLimits = {
  windowMs: 15 * 60 * 1000,
  perEmail: () => Number(process.env.STEERWISE_SIGNIN_LIMIT_EMAIL || 5),
  perIp: () => Number(process.env.STEERWISE_SIGNIN_LIMIT_IP || 30),
};

export function clientIp(headers: Headers | Record<string, string | string[] | undefined>): string {
  const get = (name: string): string | undefined => {
    if (headers instanceof Headers) return headers.get(name) ?? undefined;
    const v = headers[name];
    return Array.isArray(v) ? v[0] : v;
  };
  return (get('x-forwarded-for')?.split(',')[0] || get('x-real-ip') || 'unknown').trim();
}

const emailKey = (email: string) => `signin:email:${email.trim().toLowerCase()}`;
const ipKey = (ip: string) => `signin:ip:${ip}`;

/** Returns the seconds to wait when sign-in is blocked for this e-mail or address, else 0. */
export async function signInBlockedFor({ email, ip }: { email: string; ip: string }): Promise<number> {
  const byEmail = await currentCount({ key: emailKey(email), windowMs: signInLimits.windowMs });
  const byIp = await currentCount({ key: ipKey(ip), windowMs: signInLimits.windowMs });
  let wait = 0;
  if (byEmail.count >= signInLimits.perEmail()) wait = Math.max(wait, byEmail.retryAfterSec);
  if (byIp.count >= signInLimits.perIp()) wait = Math.max(wait, byIp.retryAfterSec);
  return wait;
}

export async function recordSignInFailure({ email, ip }: { email: string; ip: string }): Promise<void> {
  await countHit({ key: emailKey(email), windowMs: signInLimits.windowMs });
  await countHit({ key: ipKey(ip), windowMs: signInLimits.windowMs });
}

export async function clearSignInFailures({ email }: { email: string }): Promise<void> {
  await clearKey(emailKey(email));
}

/** A general limiter for e-mail-sending endpoints (reset requests): throws nothing, returns whether allowed. */
export async function allowHit({
  key,
  limit,
  windowMs,
}: {
  key: string;
  limit: number;
  windowMs: number;
}): Promise<boolean> {
  return (await countHit({ key, windowMs })) <= limit;
}
