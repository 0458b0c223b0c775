import fs from 'node:fs';
import path from 'node:path';
import { dataDir } from '@/lib/env';

/**
 * Paths of stored dataset files, relative to the data folder as the datasets
 * feature stores them (datasets/<team>/<uuid><ext>). A path that leaves the
 * data folder is refused.
 */
export function resolveDataPath(storagePath: string): string {
  const root = dataDir();
  const full = path.resolve(root, storagePath);
  if (!full.startsWith(root + path.sep)) throw new Error(`storage path ${storagePath} leaves the data folder`);
  return full;
}

export async function removeQuietly(file: string): Promise<void> {
  await fs.promises.rm(file, { force: true }).catch(() => undefined);
}
