import fs from 'node:fs';
import { dataDir } from '../env';
import { resolveStoragePath } from './files';
import { objectStoreFromEnv, type ObjectStore } from './object-store';
import type { ByteRanges, ByteSource } from '../datasets/io';

/**
 * Stored files shared between machines. With STEERWISE_S3_BUCKET set, the
 * bucket is the shared copy: a file written under the data folder is
 * published to it (`publishStoredFile`, before the row that names it
 * commits), a process that needs a file it does not have downloads it into
 * its own data folder first (`ensureLocalFile`, a cache), and a deleted
 * file is removed from both. Without the variable every function here does
 * nothing beyond the data folder, as in the embedded setup.
 */
let cached: { key: string; store: ObjectStore } | undefined;

export function sharedStore(): ObjectStore | null {
  if (!process.env.STEERWISE_S3_BUCKET) return null;
  const key = `${process.env.STEERWISE_S3_BUCKET}|${process.env.STEERWISE_S3_PREFIX}|${process.env.STEERWISE_S3_ENDPOINT}`;
  if (cached?.key !== key) cached = { key, store: objectStoreFromEnv(dataDir()) };
  return cached.store;
}

/** Uploads a stored file (relative to the data folder) to the shared store; a no-op on local disk. */
export async function publishStoredFile(relative: string): Promise<void> {
  const store = sharedStore();
  if (store) await store.putFile(relative, resolveStoragePath(relative));
}

/** The absolute local path of a stored file, downloaded from the shared store first when missing here. */
export async function ensureLocalFile(relative: string): Promise<string> {
  const file = resolveStoragePath(relative);
  const store = sharedStore();
  if (store && !fs.existsSync(file)) await store.download(relative, file);
  return file;
}

/**
 * A stored file for a reader that needs only part of it (a header, a few blocks): the local
 * path when this process has the file or there is no shared store, else byte ranges of the
 * shared copy, so nothing is downloaded beyond the bytes read.
 */
export async function storedBytes(relative: string): Promise<ByteSource> {
  const file = resolveStoragePath(relative);
  const store = sharedStore();
  if (!store || fs.existsSync(file)) return file;
  return objectRanges(store, relative);
}

/** Byte ranges of one object of a store (each `read` is one ranged GET on S3). */
export async function objectRanges(store: ObjectStore, key: string): Promise<ByteRanges> {
  const size = await store.size(key);
  return {
    size,
    read: (start, end) =>
      start >= size ? Promise.resolve(Buffer.alloc(0)) : store.readRange(key, start, Math.min(end, size)),
  };
}

/** Removes a stored file from the shared store (the local copy is the caller's); never throws. */
export async function unpublishStoredFile(relative: string): Promise<void> {
  const store = sharedStore();
  if (store) await store.remove(relative).catch(() => undefined);
}
