/**
 * The object-store interface (lib/storage/object-store.ts) on both backends: the data folder, and S3 as served
 * by s3rver (a local S3 fake, started here on a free port; no mocks). A 12 MiB file goes up as a multipart upload
 * (5 MiB parts), comes back whole and as byte ranges, and is removed.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { createHash, randomBytes } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { LocalStore, S3Store, objectStoreFromEnv, type ObjectStore } from '@/lib/storage/object-store';
import { startS3Fake, type S3Fake } from '../../../scripts/s3-fake';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'steerwise-store-'));
const source = path.join(dir, 'source.bin');
const bytes = randomBytes(12 * 1024 * 1024);
let server: S3Fake;
let endpoint = '';

beforeAll(async () => {
  fs.writeFileSync(source, bytes);
  server = await startS3Fake({ directory: path.join(dir, 's3'), bucket: 'steerwise-test' });
  endpoint = server.endpoint;
});

afterAll(async () => {
  await server?.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

const sha = (b: Buffer) => createHash('sha256').update(b).digest('hex');

function stores(): [string, () => ObjectStore][] {
  return [
    ['local', () => new LocalStore(path.join(dir, 'local'))],
    [
      's3',
      () =>
        new S3Store({
          bucket: 'steerwise-test',
          prefix: 'team-a',
          endpoint,
          region: 'us-east-1',
          accessKeyId: 'S3RVER',
          secretAccessKey: 'S3RVER',
        }),
    ],
  ];
}

describe.each(stores())('object store: %s', (_name, make) => {
  it('stores a 12 MiB file (multipart on S3), reads it back whole and by ranges, then removes it', async () => {
    const store = make();
    const key = 'datasets/1/recording.npy';
    expect(await store.exists(key)).toBe(false);
    await store.putFile(key, source);
    expect(await store.exists(key)).toBe(true);
    expect(await store.size(key)).toBe(bytes.length);
    expect(sha(await store.readRange(key, 0, 128))).toBe(sha(bytes.subarray(0, 128)));
    const mid = 7 * 1024 * 1024 - 10; // across the first part boundary
    expect(sha(await store.readRange(key, mid, mid + 4096))).toBe(sha(bytes.subarray(mid, mid + 4096)));
    const copy = path.join(dir, `copy-${_name}.bin`);
    await store.download(key, copy);
    expect(sha(fs.readFileSync(copy))).toBe(sha(bytes));
    await store.remove(key);
    expect(await store.exists(key)).toBe(false);
  });

  it('refuses keys that leave the store', async () => {
    await expect(make().exists('../outside')).rejects.toThrow(/relative path/);
  });
});

it('STEERWISE_S3_BUCKET selects S3, otherwise the data folder', () => {
  expect(objectStoreFromEnv(dir, {}).kind).toBe('local');
  expect(objectStoreFromEnv(dir, { STEERWISE_S3_BUCKET: 'b', STEERWISE_S3_ENDPOINT: endpoint }).kind).toBe('s3');
});
