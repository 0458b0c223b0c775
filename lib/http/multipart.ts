import 'server-only';
import fs from 'node:fs';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import busboy from 'busboy';
import { Sha256PassThrough } from '../datasets';
import { newTempPath, removeQuietly } from '../storage/files';
import { ApiError } from './errors';

/**
 * The one multipart/form-data receiver: every route that takes a file
 * (dataset upload, bundle import) reads its request with `receiveFile`.
 *
 * The `file` part is streamed to a temporary file under the data folder
 * (lib/storage/files.ts, `uploads/tmp/<uuid>.part`) while hashed (SHA-256 of
 * the bytes as received), under a size limit: a file over the limit is
 * refused with 413 as soon as the limit is crossed. Text fields are collected
 * by name. A client that goes away (the request signal) stops the reading at
 * once. On any failure the temp file is removed before the promise rejects;
 * on success the caller renames or deletes it.
 */
export interface ReceivedFile {
  /** Absolute path of the temporary file; the caller renames or deletes it. */
  tempPath: string;
  originalName: string;
  sha256: string;
  bytes: number;
  /** The text fields of the form, by name (the last value wins). */
  fields: Record<string, string>;
}

export interface ReceiveFileOptions {
  /** What the file holds, for messages: "dataset", "bundle". */
  noun: string;
  maxBytes: number;
  /** The 413 for a file over maxBytes (it names the setting that raises the limit). */
  tooLarge: (maxBytes: number) => ApiError;
  /** The message when the form has no `file` part. */
  missingFile?: string;
  /** Most text fields accepted (default 20); each at most 2000 bytes. */
  maxFields?: number;
}

const MAX_FIELD_BYTES = 2000;
/** Room for the form's own bytes around the file when a declared length is checked against the limit. */
const FORM_OVERHEAD_BYTES = 64 * 1024;

/**
 * Reads a multipart/form-data request with one `file` part. Resolves when the
 * whole body has been read and the file flushed to disk. Refusals are
 * ApiErrors: 415 for another content type, 413 over the limit, 422 for a
 * missing, doubled or misnamed file, too many or too long fields, a malformed
 * or interrupted body.
 */
export async function receiveFile(
  req: Request,
  { noun, maxBytes, tooLarge, missingFile, maxFields = 20 }: ReceiveFileOptions,
): Promise<ReceivedFile> {
  const type = req.headers.get('content-type') ?? '';
  if (!/^multipart\/form-data\b/i.test(type) || !/boundary=/i.test(type)) {
    throw new ApiError(
      'unsupported_format',
      `Send the ${noun} as multipart/form-data with a "file" field (got ${type.split(';')[0] || 'no content type'}).`,
    );
  }
  if (!req.body)
    throw new ApiError('validation_failed', 'The request has no body: send a "file" field.', {
      fields: { file: ['a file is required'] },
    });
  // A declared length far above the limit is refused before reading.
  const declared = Number(req.headers.get('content-length') ?? NaN);
  if (Number.isFinite(declared) && declared > maxBytes + FORM_OVERHEAD_BYTES) throw tooLarge(maxBytes);

  let bb: busboy.Busboy;
  try {
    bb = busboy({
      headers: { 'content-type': type },
      limits: { files: 1, fileSize: maxBytes, fields: maxFields, fieldSize: MAX_FIELD_BYTES, parts: maxFields + 1 },
    });
  } catch (err) {
    throw new ApiError('unsupported_format', `The multipart body cannot be read: ${(err as Error).message}.`);
  }

  const tempPath = await newTempPath();
  const fields: Record<string, string> = {};
  let fileWrite: Promise<void> | null = null;
  let originalName = '';
  let tap: Sha256PassThrough | null = null;
  let failure: ApiError | null = null;
  const fail = (err: ApiError) => {
    failure ??= err;
  };
  const interrupted = (detail: string) => new ApiError('validation_failed', `The upload was interrupted: ${detail}`);

  bb.on('field', (name, value, info) => {
    if (info.valueTruncated)
      fail(
        new ApiError('validation_failed', `The form field "${name}" is longer than ${MAX_FIELD_BYTES} bytes.`, {
          fields: { [name]: ['too long'] },
        }),
      );
    fields[name] = value;
  });
  bb.on('fieldsLimit', () => fail(new ApiError('validation_failed', `The form has more than ${maxFields} fields.`)));
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
            `Unexpected file field "${name}": send the ${noun} in a field named "file".`,
            {
              fields: { file: ['a file is required'] },
            },
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
      throw interrupted(message);
    }
    if (fileWrite) {
      try {
        await fileWrite;
      } catch (err) {
        if (failure) throw failure;
        throw interrupted((err as Error)?.message ?? String(err));
      }
    }
    if (failure) throw failure;
    if (!fileWrite || !tap) {
      throw new ApiError(
        'validation_failed',
        missingFile ?? `No file was sent: put the ${noun} in a form field named "file".`,
        { fields: { file: ['a file is required'] } },
      );
    }
    const t = tap as Sha256PassThrough;
    return { tempPath, originalName: originalName || 'upload', sha256: t.digestHex(), bytes: t.bytes, fields };
  } catch (err) {
    await removeQuietly(tempPath);
    throw err;
  }
}

/** A byte count for messages: "200 MiB", "1.5 KiB", "900 bytes". */
export function formatBytes(n: number): string {
  if (n >= 1024 * 1024) return `${(n / (1024 * 1024)).toFixed(n % (1024 * 1024) === 0 ? 0 : 1)} MiB`;
  if (n >= 1024) return `${(n / 1024).toFixed(n % 1024 === 0 ? 0 : 1)} KiB`;
  return `${n} bytes`;
}
