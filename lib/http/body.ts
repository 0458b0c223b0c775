/** Reading request bodies and route parameters under the API's size and content-type limits. */
import type { z } from 'zod';
import { maxJsonBytes } from '../env';
import { ApiError } from './errors';

/** Reads a JSON body under the size limit: 413 when larger, 400 when malformed. */
export async function readJson(req: Request, limit = maxJsonBytes()): Promise<unknown> {
  const declared = Number(req.headers.get('content-length') ?? NaN);
  if (Number.isFinite(declared) && declared > limit) {
    throw new ApiError('too_large', `The request body is ${declared} bytes; the limit is ${limit} bytes.`);
  }
  const type = req.headers.get('content-type') ?? '';
  if (type && !/^application\/(.+\+)?json\b/i.test(type)) {
    throw new ApiError('unsupported_format', `Send the body as application/json (got ${type.split(';')[0]}).`);
  }
  const text = await readTextLimited(req, limit);
  if (!text.trim()) throw new ApiError('bad_json', 'The request body is empty; send a JSON object.');
  try {
    return JSON.parse(text);
  } catch (err) {
    throw new ApiError('bad_json', `The request body is not valid JSON: ${(err as Error).message}`);
  }
}

/**
 * The checks of readJson (declared size, content type, size while reading, not empty) without
 * the parse: the body's bytes, for a caller that parses them elsewhere (a worker thread).
 */
export async function readJsonBytes(req: Request, limit = maxJsonBytes()): Promise<Buffer> {
  const declared = Number(req.headers.get('content-length') ?? NaN);
  if (Number.isFinite(declared) && declared > limit) {
    throw new ApiError('too_large', `The request body is ${declared} bytes; the limit is ${limit} bytes.`);
  }
  const type = req.headers.get('content-type') ?? '';
  if (type && !/^application\/(.+\+)?json\b/i.test(type)) {
    throw new ApiError('unsupported_format', `Send the body as application/json (got ${type.split(';')[0]}).`);
  }
  const bytes = await readBytesLimited(req, limit);
  let i = 0;
  while (i < bytes.length && (bytes[i] === 0x20 || bytes[i] === 0x09 || bytes[i] === 0x0a || bytes[i] === 0x0d)) i++;
  if (i === bytes.length) throw new ApiError('bad_json', 'The request body is empty; send a JSON object.');
  return bytes;
}

/** Like readJson, but an empty body (no content, no content type) reads as `{}` (bodies that are optional). */
export async function readOptionalJson(req: Request, limit = maxJsonBytes()): Promise<unknown> {
  const declared = req.headers.get('content-length');
  if (!req.body || declared === '0') return {};
  const type = req.headers.get('content-type') ?? '';
  if (type && !/^application\/(.+\+)?json\b/i.test(type)) {
    throw new ApiError('unsupported_format', `Send the body as application/json (got ${type.split(';')[0]}).`);
  }
  const text = await readTextLimited(req, limit);
  if (!text.trim()) return {};
  try {
    return JSON.parse(text);
  } catch (err) {
    throw new ApiError('bad_json', `The request body is not valid JSON: ${(err as Error).message}`);
  }
}

async function readTextLimited(req: Request, limit: number): Promise<string> {
  return (await readBytesLimited(req, limit)).toString('utf8');
}

async function readBytesLimited(req: Request, limit: number): Promise<Buffer> {
  if (!req.body) return Buffer.alloc(0);
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > limit) {
      await reader.cancel().catch(() => undefined);
      throw new ApiError('too_large', `The request body is larger than the limit of ${limit} bytes.`);
    }
    chunks.push(value);
  }
  return Buffer.concat(chunks);
}

/** Parses with a zod schema; failures become 422 with per-field messages. */
export function parseBody<T extends z.ZodType>(schema: T, data: unknown): z.infer<T> {
  return schema.parse(data);
}

/** Parses a positive integer id from a route parameter; anything else is 404. */
export function parseId(raw: string | undefined, what = 'record'): number {
  if (!raw || !/^[1-9][0-9]{0,15}$/.test(raw)) throw new ApiError('not_found', `No ${what} with id '${raw ?? ''}'.`);
  return Number(raw);
}
