/**
 * Backup and restore of a Steerwise data folder (operator commands
 * `npm run backup` and `npm run restore`; no server-only imports so the
 * scripts can use it).
 *
 * Archive: a zip holding
 *   steerwise-backup.json   {format: "steerwise-backup", version: 1, createdAt, files: [{path, bytes, sha256}]}
 *   db/steerwise.sqlite     a consistent copy taken with `VACUUM INTO` (safe while the server runs)
 *   files/<relative path>   datasets/**, snapshots/**, bearing-time-records/** and auth-secret from the data folder
 *
 * Restore writes into an empty data folder only, after checking the manifest
 * and every SHA-256, and runs `PRAGMA integrity_check` on the database.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { createHash } from 'node:crypto';
import JSZip from 'jszip';
import sqlite3 from 'sqlite3';

export const BACKUP_FORMAT = 'steerwise-backup';
export const BACKUP_VERSION = 1;
const MANIFEST = 'steerwise-backup.json';
const DB_ENTRY = 'db/steerwise.sqlite';
const FILE_ROOTS = ['datasets', 'snapshots', 'bearing-time-records'];

export interface BackupManifest {
  format: typeof BACKUP_FORMAT;
  version: number;
  createdAt: string;
  files: { path: string; bytes: number; sha256: string }[];
}

export class BackupError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'BackupError';
  }
}

const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');

function run(db: sqlite3.Database, sql: string, params: unknown[] = []): Promise<void> {
  return new Promise((resolve, reject) => db.run(sql, params, (err) => (err ? reject(err) : resolve())));
}
function all<T>(db: sqlite3.Database, sql: string): Promise<T[]> {
  return new Promise((resolve, reject) => db.all(sql, (err, rows) => (err ? reject(err) : resolve(rows as T[]))));
}
function open(file: string, mode?: number): Promise<sqlite3.Database> {
  return new Promise((resolve, reject) => {
    const db = new sqlite3.Database(file, mode ?? sqlite3.OPEN_READWRITE, (err) => (err ? reject(err) : resolve(db)));
  });
}
function close(db: sqlite3.Database): Promise<void> {
  return new Promise((resolve) => db.close(() => resolve()));
}

function listFiles(root: string, dir: string): string[] {
  let entries: fs.Dirent[];
  try {
    entries = fs.readdirSync(path.join(root, dir), { withFileTypes: true });
  } catch {
    return [];
  }
  return entries.flatMap((e) => {
    const rel = path.posix.join(dir, e.name);
    if (e.isDirectory()) return listFiles(root, rel);
    return e.name.endsWith('.part') ? [] : [rel];
  });
}

/** Writes a backup of `dataDir` (database `dbFile`) to `out`. Returns the manifest. */
export async function createBackup({
  dataDir,
  dbFile,
  out,
}: {
  dataDir: string;
  dbFile: string;
  out: string;
}): Promise<BackupManifest> {
  if (!fs.existsSync(dbFile)) throw new BackupError(`There is no database at ${dbFile}.`);
  const work = fs.mkdtempSync(path.join(os.tmpdir(), 'steerwise-backup-'));
  try {
    const copy = path.join(work, 'steerwise.sqlite');
    const db = await open(dbFile);
    try {
      await run(db, 'PRAGMA busy_timeout = 10000');
      await run(db, 'VACUUM INTO ?', [copy]);
    } finally {
      await close(db);
    }
    // Files the copied database refers to must be in the archive; files added later are not needed.
    const snap = await open(copy, sqlite3.OPEN_READONLY);
    const stored = await all<{ storagePath: string }>(snap, 'SELECT storagePath FROM datasets').finally(() =>
      close(snap),
    );
    const zip = new JSZip();
    const files: BackupManifest['files'] = [];
    const add = (entry: string, data: Buffer) => {
      zip.file(entry, data, { compression: 'STORE' });
      files.push({ path: entry, bytes: data.byteLength, sha256: sha256(data) });
    };
    add(DB_ENTRY, fs.readFileSync(copy));
    const rels = [
      ...FILE_ROOTS.flatMap((r) => listFiles(dataDir, r)),
      ...(fs.existsSync(path.join(dataDir, 'auth-secret')) ? ['auth-secret'] : []),
    ];
    for (const rel of rels) {
      try {
        add(`files/${rel}`, fs.readFileSync(path.join(dataDir, rel)));
      } catch {
        /* removed while the backup ran; checked below */
      }
    }
    const have = new Set(files.map((f) => f.path));
    const missing = stored.map((s) => `files/${s.storagePath.split(path.sep).join('/')}`).filter((p) => !have.has(p));
    if (missing.length)
      throw new BackupError(`Stored files the database refers to are missing: ${missing.slice(0, 5).join(', ')}.`);
    const manifest: BackupManifest = {
      format: BACKUP_FORMAT,
      version: BACKUP_VERSION,
      createdAt: new Date().toISOString(),
      files,
    };
    zip.file(MANIFEST, JSON.stringify(manifest, null, 2) + '\n');
    const bytes = await zip.generateAsync({ type: 'nodebuffer', compression: 'STORE' });
    const temp = `${out}.part`;
    fs.mkdirSync(path.dirname(path.resolve(out)), { recursive: true });
    fs.writeFileSync(temp, bytes);
    fs.renameSync(temp, out);
    return manifest;
  } finally {
    fs.rmSync(work, { recursive: true, force: true });
  }
}

/**
 * Restores `archive` into `dataDir` (which must be missing or empty), the
 * database going to `dbFile`. Refuses foreign and damaged archives before
 * writing anything.
 */
export async function restoreBackup({
  archive,
  dataDir,
  dbFile,
}: {
  archive: string;
  dataDir: string;
  dbFile: string;
}): Promise<BackupManifest> {
  if (!fs.existsSync(archive)) throw new BackupError(`There is no archive at ${archive}.`);
  if (fs.existsSync(dataDir) && fs.readdirSync(dataDir).length) {
    throw new BackupError(`The data folder ${dataDir} is not empty; restore only into an empty folder.`);
  }
  if (fs.existsSync(dbFile))
    throw new BackupError(`A database already exists at ${dbFile}; restore only into an empty place.`);
  let zip: JSZip;
  try {
    zip = await JSZip.loadAsync(fs.readFileSync(archive), { checkCRC32: true });
  } catch (err) {
    throw new BackupError(
      `${archive} is not a readable zip archive (${(err as Error).message}); it is damaged or not a Steerwise backup.`,
    );
  }
  const entry = zip.file(MANIFEST);
  if (!entry) throw new BackupError(`${archive} holds no ${MANIFEST}; it is not a Steerwise backup.`);
  let manifest: BackupManifest;
  try {
    manifest = JSON.parse(await entry.async('string')) as BackupManifest;
  } catch {
    throw new BackupError(`${MANIFEST} in ${archive} is not valid JSON; the archive is damaged.`);
  }
  if (manifest.format !== BACKUP_FORMAT)
    throw new BackupError(`${archive} is not a Steerwise backup (format "${String(manifest.format)}").`);
  if (manifest.version !== BACKUP_VERSION)
    throw new BackupError(
      `${archive} is backup version ${manifest.version}; this Steerwise reads version ${BACKUP_VERSION}.`,
    );
  const contents = new Map<string, Buffer>();
  for (const f of manifest.files) {
    if (f.path.includes('..') || path.isAbsolute(f.path) || !(f.path === DB_ENTRY || f.path.startsWith('files/'))) {
      throw new BackupError(`The manifest names an unsafe path "${f.path}"; the archive is refused.`);
    }
    const e = zip.file(f.path);
    if (!e) throw new BackupError(`${f.path} is listed in the manifest but missing from the archive; it is damaged.`);
    let data: Buffer;
    try {
      data = await e.async('nodebuffer');
    } catch (err) {
      throw new BackupError(`${f.path} cannot be read (${(err as Error).message}); the archive is damaged.`);
    }
    if (data.byteLength !== f.bytes || sha256(data) !== f.sha256)
      throw new BackupError(`${f.path} does not match its SHA-256 in the manifest; the archive is damaged.`);
    contents.set(f.path, data);
  }
  if (!contents.has(DB_ENTRY)) throw new BackupError(`${archive} holds no database; it is damaged.`);
  fs.mkdirSync(dataDir, { recursive: true });
  fs.mkdirSync(path.dirname(dbFile), { recursive: true });
  fs.writeFileSync(dbFile, contents.get(DB_ENTRY)!);
  for (const [p, data] of contents) {
    if (p === DB_ENTRY) continue;
    const target = path.join(dataDir, p.slice('files/'.length));
    fs.mkdirSync(path.dirname(target), { recursive: true });
    fs.writeFileSync(target, data, p === 'files/auth-secret' ? { mode: 0o600 } : {});
  }
  const db = await open(dbFile);
  try {
    const rows = await all<{ integrity_check: string }>(db, 'PRAGMA integrity_check');
    if (rows[0]?.integrity_check !== 'ok')
      throw new BackupError(
        `The restored database fails PRAGMA integrity_check: ${rows.map((r) => r.integrity_check).join('; ')}.`,
      );
  } finally {
    await close(db);
  }
  return manifest;
}
