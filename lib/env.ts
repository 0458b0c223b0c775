import fs from 'node:fs';
import path from 'node:path';
import { randomBytes } from 'node:crypto';

/**
 * Environment, read lazily so tests can set variables before first use.
 * Every variable is listed in the README table.
 */
export function dataDir(): string {
  return path.resolve(/*turbopackIgnore: true*/ process.env.STEERWISE_DATA_DIR || 'data');
}

export function dbPath(): string {
  return path.resolve(/*turbopackIgnore: true*/ process.env.STEERWISE_DB || path.join(dataDir(), 'steerwise.sqlite'));
}

/**
 * DATABASE_URL when it names a Postgres database (postgres:// or postgresql://),
 * else undefined: the embedded SQLite file (dbPath) is used.
 */
export function databaseUrl(): string | undefined {
  const url = process.env.DATABASE_URL?.trim();
  return url && /^postgres(ql)?:\/\//.test(url) ? url : undefined;
}

/** What the app opens: the Postgres URL when DATABASE_URL is set, else the SQLite file. */
export function dbTarget(): string {
  return databaseUrl() ?? dbPath();
}

export function isPostgresTarget(target: string): boolean {
  return /^postgres(ql)?:\/\//.test(target);
}

let fileSecret: string | undefined;

/**
 * The secret that signs session cookies and CSRF tokens: NEXTAUTH_SECRET, or
 * else a random secret generated once into <data dir>/auth-secret (mode 600),
 * so a fresh clone runs without setup and no secret is ever committed.
 */
export function authSecret(): string {
  if (process.env.NEXTAUTH_SECRET) return process.env.NEXTAUTH_SECRET;
  if (fileSecret) return fileSecret;
  const file = path.join(/*turbopackIgnore: true*/ dataDir(), 'auth-secret');
  try {
    fileSecret = fs.readFileSync(file, 'utf8').trim();
  } catch {
    fs.mkdirSync(dataDir(), { recursive: true });
    const fresh = randomBytes(32).toString('base64url');
    try {
      fs.writeFileSync(file, fresh, { mode: 0o600, flag: 'wx' });
      fileSecret = fresh;
    } catch {
      fileSecret = fs.readFileSync(file, 'utf8').trim(); // another process won the race
    }
  }
  return fileSecret!;
}

export function appUrl(fallbackOrigin?: string): string {
  return (process.env.NEXTAUTH_URL || fallbackOrigin || 'http://localhost:3000').replace(/\/$/, '');
}

export function smtpSinkPort(): number {
  return Number(process.env.SMTP_SINK_PORT || 2525);
}

export function mailFrom(): string {
  return process.env.SMTP_FROM || 'Steerwise <no-reply@steerwise.test>';
}

/** Largest JSON body accepted by API handlers, in bytes. */
export function maxJsonBytes(): number {
  return Number(process.env.STEERWISE_MAX_JSON_BYTES || 1_000_000);
}

export const DEFAULT_MAX_UPLOAD_BYTES = 200 * 1024 * 1024;

/** Largest dataset upload (STEERWISE_MAX_UPLOAD_BYTES, default 200 MiB); larger is 413. */
export function maxUploadBytes(): number {
  const raw = Number(process.env.STEERWISE_MAX_UPLOAD_BYTES);
  return Number.isFinite(raw) && raw > 0 ? Math.floor(raw) : DEFAULT_MAX_UPLOAD_BYTES;
}

export const DEFAULT_MAX_BUNDLE_BYTES = 256 * 1024 * 1024;

/** Largest bundle upload (STEERWISE_MAX_BUNDLE_BYTES, default 256 MiB); larger is 413. */
export function maxBundleBytes(): number {
  const raw = Number(process.env.STEERWISE_MAX_BUNDLE_BYTES);
  return Number.isFinite(raw) && raw > 0 ? Math.floor(raw) : DEFAULT_MAX_BUNDLE_BYTES;
}
