import fs from 'node:fs';
import path from 'node:path';
import { pipeline } from 'node:stream/promises';
import { randomUUID } from 'node:crypto';
import type { Readable } from 'node:stream';

/**
 * One interface over where stored files live, keyed by the relative paths
 * the database already holds (`datasets/<team>/<uuid><ext>`,
 * `snapshots/<ab>/<sha256>.c128`, `uploads/tmp/…`):
 *
 * - local (default): files under the data folder, as today;
 * - S3 (STEERWISE_S3_BUCKET set): objects in that bucket under
 *   STEERWISE_S3_PREFIX, through @aws-sdk/client-s3 with STEERWISE_S3_ENDPOINT
 *   (S3-compatible servers; path-style addressing), STEERWISE_S3_REGION
 *   (default us-east-1) and the credentials STEERWISE_S3_ACCESS_KEY_ID /
 *   STEERWISE_S3_SECRET_ACCESS_KEY (else the SDK's default chain). Uploads
 *   stream as multipart (@aws-sdk/lib-storage); `readRange` asks for a byte
 *   range, so a reader that needs a header or one block reads only that.
 *
 * lib/storage/shared.ts publishes datasets and snapshot sets through it and
 * fetches them into a process's data folder (`putFile`, `download`); readers
 * that need only part of a file read ranges (`storedBytes`: a recording's
 * header when a bearing–time record is created). Tested against s3rver in
 * tests/lib/storage/object-store.test.ts.
 */
export interface ObjectStore {
  readonly kind: 'local' | 's3';
  /** Stores a local file under `key`, streaming it (multipart on S3). */
  putFile(key: string, file: string): Promise<void>;
  /** Bytes [start, end) of an object. */
  readRange(key: string, start: number, end: number): Promise<Buffer>;
  /** The object's size in bytes. */
  size(key: string): Promise<number>;
  /** The whole object into a local file (a worker's cache for readers that need a path). */
  download(key: string, file: string): Promise<void>;
  exists(key: string): Promise<boolean>;
  remove(key: string): Promise<void>;
}

function safeKey(key: string): string {
  const k = key.split(path.sep).join('/');
  if (!k || k.startsWith('/') || k.split('/').includes('..'))
    throw new Error(`storage key ${key} is not a relative path`);
  return k;
}

export class LocalStore implements ObjectStore {
  readonly kind = 'local' as const;
  constructor(private readonly root: string) {}
  private full(key: string): string {
    return path.join(this.root, safeKey(key));
  }
  async putFile(key: string, file: string): Promise<void> {
    const dest = this.full(key);
    await fs.promises.mkdir(path.dirname(dest), { recursive: true });
    const temp = `${dest}.${randomUUID()}.part`;
    await pipeline(fs.createReadStream(file), fs.createWriteStream(temp, { flags: 'wx' }));
    await fs.promises.rename(temp, dest);
  }
  async readRange(key: string, start: number, end: number): Promise<Buffer> {
    const handle = await fs.promises.open(this.full(key), 'r');
    try {
      const buf = Buffer.alloc(Math.max(0, end - start));
      const { bytesRead } = await handle.read(buf, 0, buf.length, start);
      return buf.subarray(0, bytesRead);
    } finally {
      await handle.close();
    }
  }
  async size(key: string): Promise<number> {
    return (await fs.promises.stat(this.full(key))).size;
  }
  async download(key: string, file: string): Promise<void> {
    await fs.promises.mkdir(path.dirname(file), { recursive: true });
    await fs.promises.copyFile(this.full(key), file);
  }
  async exists(key: string): Promise<boolean> {
    return fs.promises.access(this.full(key)).then(
      () => true,
      () => false,
    );
  }
  async remove(key: string): Promise<void> {
    await fs.promises.rm(this.full(key), { force: true });
  }
}

export interface S3Settings {
  bucket: string;
  prefix?: string;
  endpoint?: string;
  region?: string;
  accessKeyId?: string;
  secretAccessKey?: string;
  /** Multipart part size in bytes (S3's minimum, 5 MiB, by default). */
  partSize?: number;
}

export class S3Store implements ObjectStore {
  readonly kind = 's3' as const;
  private client?: Promise<import('@aws-sdk/client-s3').S3Client>;
  constructor(private readonly s: S3Settings) {}

  private objectKey(key: string): string {
    const prefix = (this.s.prefix ?? '').replace(/^\/+|\/+$/g, '');
    return prefix ? `${prefix}/${safeKey(key)}` : safeKey(key);
  }

  private s3() {
    this.client ??= import('@aws-sdk/client-s3').then(
      ({ S3Client }) =>
        new S3Client({
          region: this.s.region || 'us-east-1',
          ...(this.s.endpoint ? { endpoint: this.s.endpoint, forcePathStyle: true } : {}),
          ...(this.s.accessKeyId && this.s.secretAccessKey
            ? { credentials: { accessKeyId: this.s.accessKeyId, secretAccessKey: this.s.secretAccessKey } }
            : {}),
        }),
    );
    return this.client;
  }

  async putFile(key: string, file: string): Promise<void> {
    const { Upload } = await import('@aws-sdk/lib-storage');
    const upload = new Upload({
      client: await this.s3(),
      params: { Bucket: this.s.bucket, Key: this.objectKey(key), Body: fs.createReadStream(file) },
      partSize: Math.max(5 * 1024 * 1024, this.s.partSize ?? 5 * 1024 * 1024),
      queueSize: 2,
      leavePartsOnError: false,
    });
    await upload.done();
  }

  async readRange(key: string, start: number, end: number): Promise<Buffer> {
    if (end <= start) return Buffer.alloc(0);
    const { GetObjectCommand } = await import('@aws-sdk/client-s3');
    const out = await (
      await this.s3()
    ).send(
      new GetObjectCommand({ Bucket: this.s.bucket, Key: this.objectKey(key), Range: `bytes=${start}-${end - 1}` }),
    );
    return Buffer.from(await out.Body!.transformToByteArray());
  }

  async download(key: string, file: string): Promise<void> {
    const { GetObjectCommand } = await import('@aws-sdk/client-s3');
    const out = await (await this.s3()).send(new GetObjectCommand({ Bucket: this.s.bucket, Key: this.objectKey(key) }));
    await fs.promises.mkdir(path.dirname(file), { recursive: true });
    const temp = `${file}.${randomUUID()}.part`;
    await pipeline(out.Body as Readable, fs.createWriteStream(temp, { flags: 'wx' }));
    await fs.promises.rename(temp, file);
  }

  async size(key: string): Promise<number> {
    const { HeadObjectCommand } = await import('@aws-sdk/client-s3');
    const head = await (
      await this.s3()
    ).send(new HeadObjectCommand({ Bucket: this.s.bucket, Key: this.objectKey(key) }));
    return Number(head.ContentLength ?? 0);
  }

  async exists(key: string): Promise<boolean> {
    const { HeadObjectCommand } = await import('@aws-sdk/client-s3');
    try {
      await (await this.s3()).send(new HeadObjectCommand({ Bucket: this.s.bucket, Key: this.objectKey(key) }));
      return true;
    } catch (err) {
      const status = (err as { $metadata?: { httpStatusCode?: number } }).$metadata?.httpStatusCode;
      if (status === 404) return false;
      throw err;
    }
  }

  async remove(key: string): Promise<void> {
    const { DeleteObjectCommand } = await import('@aws-sdk/client-s3');
    await (await this.s3()).send(new DeleteObjectCommand({ Bucket: this.s.bucket, Key: this.objectKey(key) }));
  }
}

/** The store the environment names: S3 when STEERWISE_S3_BUCKET is set, else the data folder. */
export function objectStoreFromEnv(
  dataDir: string,
  env: Record<string, string | undefined> = process.env,
): ObjectStore {
  if (!env.STEERWISE_S3_BUCKET) return new LocalStore(dataDir);
  return new S3Store({
    bucket: env.STEERWISE_S3_BUCKET,
    prefix: env.STEERWISE_S3_PREFIX,
    endpoint: env.STEERWISE_S3_ENDPOINT,
    region: env.STEERWISE_S3_REGION,
    accessKeyId: env.STEERWISE_S3_ACCESS_KEY_ID,
    secretAccessKey: env.STEERWISE_S3_SECRET_ACCESS_KEY,
  });
}
