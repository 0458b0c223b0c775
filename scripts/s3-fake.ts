import { createRequire } from 'node:module';

/**
 * s3rver (a local S3 fake) on a free port of 127.0.0.1 with one bucket, its objects under
 * `directory`: for npm run scale:check --s3 and the storage tests (real S3 requests, no mocks).
 */
export interface S3Fake {
  endpoint: string;
  port: number;
  close(): Promise<void>;
}

type S3rverInstance = { run(): Promise<import('node:net').AddressInfo>; close(): Promise<void> };

export async function startS3Fake({ directory, bucket }: { directory: string; bucket: string }): Promise<S3Fake> {
  const S3rver = createRequire(import.meta.url)('s3rver') as new (o: object) => S3rverInstance;
  const server = new S3rver({
    port: 0,
    address: '127.0.0.1',
    silent: true,
    directory,
    configureBuckets: [{ name: bucket }],
  });
  const { port } = await server.run();
  return { endpoint: `http://127.0.0.1:${port}`, port, close: () => server.close() };
}
