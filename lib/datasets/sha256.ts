/** SHA-256 of file bytes, streamed (constant memory). Digests are lowercase hex. */
import { createHash, type Hash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import { Transform, type TransformCallback } from 'node:stream';

/** Hex SHA-256 of the file at `path`, read in 1 MiB pieces. */
export async function sha256File(path: string, options: { signal?: AbortSignal } = {}): Promise<string> {
  const hash = createHash('sha256');
  const stream = createReadStream(path, { highWaterMark: 1024 * 1024 });
  try {
    for await (const piece of stream as AsyncIterable<Buffer>) {
      if (options.signal?.aborted) throw options.signal.reason ?? new Error('aborted');
      hash.update(piece);
    }
  } finally {
    stream.destroy();
  }
  return hash.digest('hex');
}

/**
 * A pass-through stream that hashes what flows through it, for hashing an
 * upload while it is written to disk: `upload.pipe(tap).pipe(file)`, then
 * `tap.digestHex()` after 'finish'. `bytes` counts what passed.
 */
export class Sha256PassThrough extends Transform {
  private readonly hash: Hash = createHash('sha256');
  private digest: string | null = null;
  bytes = 0;

  override _transform(chunk: Buffer, _encoding: BufferEncoding, callback: TransformCallback): void {
    this.hash.update(chunk);
    this.bytes += chunk.length;
    callback(null, chunk);
  }

  override _flush(callback: TransformCallback): void {
    this.digest = this.hash.digest('hex');
    callback();
  }

  /** The hex digest; only available once the stream has ended. */
  digestHex(): string {
    if (this.digest === null) throw new Error('Sha256PassThrough: the stream has not ended yet');
    return this.digest;
  }
}
