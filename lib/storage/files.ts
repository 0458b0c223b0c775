import 'server-only';
import fs from 'node:fs';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { dataDir } from '../env';

/**
 * Files under the data folder (STEERWISE_DATA_DIR). Every stored path in the
 * database is relative to it:
 *   uploads/tmp/<uuid>.part      a file being received or checked (removed in the caller's finally)
 *   datasets/<team>/<uuid><ext>  stored datasets (moved there by rename, same file system)
 */

export function tempDir(): string {
  return path.join(dataDir(), 'uploads', 'tmp');
}

export function datasetsDir(): string {
  return path.join(dataDir(), 'datasets');
}

/** A fresh path in the temp folder (created if missing), `<uuid><suffix>`; nothing is written yet. */
export async function newTempPath(suffix = '.part'): Promise<string> {
  await fs.promises.mkdir(tempDir(), { recursive: true });
  return path.join(tempDir(), `${randomUUID()}${suffix}`);
}

/** Absolute path of a stored file from its storagePath (relative to the data folder). Refuses paths that leave it. */
export function resolveStoragePath(storagePath: string): string {
  const root = dataDir();
  const full = path.resolve(root, storagePath);
  if (!full.startsWith(root + path.sep)) throw new Error(`storage path ${storagePath} leaves the data folder`);
  return full;
}

/** Deletes a file if it exists; never throws (for cleanup in `finally`). */
export async function removeQuietly(file: string | null | undefined): Promise<void> {
  if (!file) return;
  await fs.promises.rm(file, { force: true }).catch(() => undefined);
}
