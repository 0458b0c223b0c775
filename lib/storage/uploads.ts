import 'server-only';
import fs from 'node:fs';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import busboy from 'busboy';
import { ApiError } from '../http';
import { dataDir } from '../env';
import { Sha256PassThrough } from '../datasets';

/**
 * Streams a multipart upload to a temporary file under the data folder while
 * hashing it (SHA-256 of the bytes as received), under a size limit.
 *
 * Layout under STEERWISE_DATA_DIR:
 *   uploads/tmp/<uuid>.part    — a file being received (deleted by the caller's finally)
 *   datasets/<team>/<uuid><ext> — stored datasets (moved there by rename, same file system)
 *
 * The limit comes from STEERWISE_MAX_UPLOAD_BYTES (default 200 MiB). A file
 * over the limit is refused with 413 as soon as the limit is crossed; the
 * partial temp file is removed.
 */
export const DEFAULT_MAX_UPLOAD_BYTES = 200 * 1024 * 1024;

export function maxUploadBytes(): number {
  const raw = Number(process.env.STEERWISE_MAX_UPLOAD_BYTES);
  return Number.isFinite(raw) && raw > 0 ? Math.floor(raw) : DEFAULT_MAX_UPLOAD_BYTES;
}

export function tempDir(): string {
  return path.join(dataDir(), 'uploads', 'tmp');
}

export function datasetsDir(): string {
  return path.join(dataDir(), 'datasets');
}

/** Absolute path of a stored dataset from its storagePath (relative to the data folder). Refuses paths that leave it. */
export function resolveStoragePath(storagePath: string): string {
  const root = dataDir();
  const full = path.resolve(root, storagePath);
  if (!full.startsWith(root + path.sep)) throw new Error(`storage path ${storagePath} leaves the data folder`);
  return full;
}

export interface ReceivedUpload {
  /** Absolute path of the temporary file; the caller renames or deletes it. */
  tempPath: string;
  originalName: string;
  sha256: string;
  bytes: number;
  /** The text fields of the form, by name (the last value wins). */
  fields: Record<string, string>;
}

const MAX_FIELDS = 20;
const MAX_FIELD_BYTES = 2000;

/**
 * Reads a multipart/form-data request with one `file` part. Resolves when the
 * whole body has been read and the file flushed to disk. On any failure the
 * temp file is removed before the promise rejects.
 */
export async function receiveUpload(
  req: Request,
  { maxBytes = maxUploadBytes() }: { maxBytes?: number } = {},
): Promise<ReceivedUpload> {
  const type = req.headers.get('content-type') ?? '';
  if (!/^multipart\/form-data\b/i.test(type) || !/boundary=/i.test(type)) {
    throw new ApiError(
      'unsupported_format',
      `Send the dataset as multipart/form-data with a "file" field (got ${type.split(';')[0] || 'no content type'}).`,
    );
  }
  if (!req.body)
    throw new ApiError('validation_failed', 'The request has no body: send a "file" field.', {
      fields: { file: ['a file is required'] },
    });
  // A declared length far above the limit is refused before reading (the form
  // adds a little overhead around the file, hence the margin).
  const declared = Number(req.headers.get('content-length') ?? NaN);
  if (Number.isFinite(declared) && declared > maxBytes + 64 * 1024) {
    throw tooLarge(maxBytes);
  }

  fs.mkdirSync(tempDir(), { recursive: true });
  const tempPath = path.join(tempDir(), `${randomUUID()}.part`);
  let bb: busboy.Busboy;
  try {
    bb = busboy({
      headers: { 'content-type': type },
      limits: { files: 1, fileSize: maxBytes, fields: MAX_FIELDS, fieldSize: MAX_FIELD_BYTES, parts: MAX_FIELDS + 1 },
    });
  } catch (err) {
    throw new ApiError('unsupported_format', `The multipart body cannot be read: ${(err as Error).message}.`);
  }

  const fields: Record<string, string> = {};
  let fileWrite: Promise<void> | null = null;
  let originalName = '';
  let tap: Sha256PassThrough | null = null;
  let failure: ApiError | null = null;
  const fail = (err: ApiError) => {
    failure ??= err;
  };

  bb.on('field', (name, value, info) => {
    if (info.valueTruncated)
      fail(
        new ApiError('validation_failed', `The form field "${name}" is longer than ${MAX_FIELD_BYTES} bytes.`, {
          fields: { [name]: ['too long'] },
        }),
      );
    fields[name] = value;
  });
  bb.on('fieldsLimit', () => fail(new ApiError('validation_failed', `The form has more than ${MAX_FIELDS} fields.`)));
  bb.on('filesLimit', () =>
    fail(
      new ApiError('validation_failed', 'Send one file per upload.', {
        fields: { file: ['only one file per upload'] },
      }),
    ),
  );
  bb.on('file', (name, stream, info) => {
    if (name !== 'file' || fileWrite) {
      stream.resume();
      if (name !== 'file')
        fail(
          new ApiError(
            'validation_failed',
            `Unexpected file field "${name}": send the dataset in a field named "file".`,
            { fields: { file: ['a file is required'] } },
          ),
        );
      return;
    }
    originalName = (info.filename ?? '').trim();
    const t = new Sha256PassThrough();
    tap = t;
    // busboy stops passing data at the limit and ends the part; the rest of the
    // body is read and discarded, then the request is refused and the temp file removed.
    stream.on('limit', () => fail(tooLarge(maxBytes)));
    fileWrite = pipeline(stream, t, fs.createWriteStream(tempPath, { flags: 'wx' }));
    // Errors are collected by the awaited promise below; keep Node from reporting them as unhandled meanwhile.
    fileWrite.catch(() => undefined);
  });

  try {
    const body = Readable.fromWeb(req.body as import('node:stream/web').ReadableStream<Uint8Array>);
    // A client that goes away aborts the request signal: stop reading at once.
    const onAbort = () =>
      body.destroy(
        new Error(
          `the client closed the connection (${String((req.signal.reason as Error)?.message ?? req.signal.reason ?? 'aborted')})`,
        ),
      );
    if (req.signal.aborted) onAbort();
    else req.signal.addEventListener('abort', onAbort, { once: true });
    try {
      await pipeline(body, bb);
    } catch (err) {
      if (failure) throw failure;
      if (err instanceof ApiError) throw err;
      const message = (err as Error)?.message ?? String(err);
      if (/Unexpected end of form|Malformed|boundary/i.test(message)) {
        throw new ApiError('validation_failed', `The multipart body is incomplete or malformed: ${message}.`);
      }
      throw new UploadAborted(message);
    }
    if (fileWrite) {
      try {
        await fileWrite;
      } catch (err) {
        if (failure) throw failure;
        throw new UploadAborted((err as Error)?.message ?? String(err));
      }
    }
    if (failure) throw failure;
    if (!fileWrite || !tap) {
      throw new ApiError('validation_failed', 'No file was sent: put the dataset in a form field named "file".', {
        fields: { file: ['a file is required'] },
      });
    }
    const t = tap as Sha256PassThrough;
    if (!originalName) originalName = 'upload';
    return { tempPath, originalName, sha256: t.digestHex(), bytes: t.bytes, fields };
  } catch (err) {
    await removeQuietly(tempPath);
    throw err;
  }
}

/** The client went away or the body stream failed part-way: nothing is kept. */
export class UploadAborted extends Error {
  constructor(detail: string) {
    super(`The upload was interrupted: ${detail}`);
    this.name = 'UploadAborted';
  }
}

function tooLarge(maxBytes: number): ApiError {
  return new ApiError(
    'too_large',
    `The file is larger than the upload limit of ${formatBytes(maxBytes)} (${maxBytes} bytes).`,
  );
}

export function formatBytes(n: number): string {
  if (n >= 1024 * 1024) return `${(n / (1024 * 1024)).toFixed(n % (1024 * 1024) === 0 ? 0 : 1)} MiB`;
  if (n >= 1024) return `${(n / 1024).toFixed(n % 1024 === 0 ? 0 : 1)} KiB`;
  return `${n} bytes`;
}

export async function removeQuietly(file: string | null | undefined): Promise<void> {
  if (!file) return;
  await fs.promises.rm(file, { force: true }).catch(() => undefined);
}
