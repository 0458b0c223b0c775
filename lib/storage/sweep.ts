import 'server-only';
import fs from 'node:fs';
import path from 'node:path';
import { Dataset } from '@/models';
import { getDb } from '../db';
import { dataDir } from '../env';
import { datasetsDir, tempDir } from './files';

/**
 * What a killed server can leave in the data folder, removed at start:
 * - every file in uploads/tmp (uploads and bundle imports being received, `.part`);
 * - any `.part` file elsewhere under datasets/;
 * - files under datasets/ that no dataset row refers to (renamed into place by
 *   a transaction that never committed).
 * Extra roots (the snapshot store) pass their own "is this file referenced" test.
 */
export async function sweepDataFolder(
  extra: { dir: string; referenced: (relative: string) => Promise<boolean> | boolean }[] = [],
): Promise<{ removed: string[] }> {
  await getDb();
  const removed: string[] = [];
  const remove = async (file: string) => {
    await fs.promises.rm(file, { force: true });
    removed.push(path.relative(dataDir(), file));
  };
  for (const f of listFiles(tempDir())) await remove(f);
  const stored = new Set(
    (await Dataset.findAll({ attributes: ['storagePath'] })).map((d) => path.normalize(d.storagePath)),
  );
  for (const f of listFiles(datasetsDir())) {
    const rel = path.normalize(path.relative(dataDir(), f));
    if (f.endsWith('.part') || !stored.has(rel)) await remove(f);
  }
  for (const root of extra) {
    for (const f of listFiles(root.dir)) {
      const rel = path.relative(dataDir(), f);
      if (f.endsWith('.part') || !(await root.referenced(rel))) await remove(f);
    }
  }
  return { removed };
}

function listFiles(dir: string): string[] {
  const out: string[] = [];
  let entries: fs.Dirent[];
  try {
    entries = fs.readdirSync(dir, { withFileTypes: true });
  } catch {
    return out;
  }
  for (const e of entries) {
    const full = path.join(dir, e.name);
    if (e.isDirectory()) out.push(...listFiles(full));
    else out.push(full);
  }
  return out;
}
