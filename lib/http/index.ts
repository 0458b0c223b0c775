import { z } from 'zod';
import { maxJsonBytes } from '../env';

/** The error codes of docs/conventions.md §7 and their HTTP statuses. */
export const errorStatus = {
  bad_json: 400,
  unauthenticated: 401,
  forbidden: 403,
  csrf_failed: 403,
  not_found: 404,
  conflict: 409,
  link_used: 409,
  too_large: 413,
  unsupported_format: 415,
  validation_failed: 422,
  link_expired: 422,
  rate_limited: 429,
  internal: 500,
  mail_unavailable: 503,
} as const;

export type ErrorCode = keyof typeof errorStatus;
export type FieldErrors = Record<string, string[]>;

export class ApiError extends Error {
  readonly code: ErrorCode;
  readonly status: number;
  readonly fields?: FieldErrors;
  readonly headers?: Record<string, string>;

  constructor(code: ErrorCode, message: string, opts: { fields?: FieldErrors; headers?: Record<string, string> } = {}) {
    super(message);
    this.name = 'ApiError';
    this.code = code;
    this.status = errorStatus[code];
    this.fields = opts.fields;
    this.headers = opts.headers;
  }
}

export function errorResponse(err: ApiError): Response {
  const body: { error: { code: string; message: string; fields?: FieldErrors } } = {
    error: { code: err.code, message: err.message },
  };
  if (err.fields) body.error.fields = err.fields;
  return Response.json(body, { status: err.status, headers: err.headers });
}

function zodFields(err: z.ZodError): FieldErrors {
  const flat = z.flattenError(err);
  const fields: FieldErrors = {};
  for (const [key, messages] of Object.entries(flat.fieldErrors as Record<string, string[] | undefined>)) {
    if (messages?.length) fields[key] = messages;
  }
  if (flat.formErrors.length) fields._ = flat.formErrors;
  return fields;
}

export function toErrorResponse(err: unknown): Response {
  if (err instanceof ApiError) return errorResponse(err);
  if (err instanceof z.ZodError) {
    const fields = zodFields(err);
    const first = Object.entries(fields)[0];
    const message = first ? `${first[0] === '_' ? 'body' : first[0]}: ${first[1][0]}` : 'Validation failed';
    return errorResponse(new ApiError('validation_failed', message, { fields }));
  }
  console.error('[steerwise] unexpected error in route handler', err);
  return errorResponse(new ApiError('internal', 'Something went wrong on the server. The detail has been logged.'));
}

/**
 * Wraps a route handler: every thrown ApiError or zod error becomes the JSON
 * error body of docs/conventions.md §7; anything else is a 500 with the detail logged.
 */
export function handle<C = unknown>(fn: (req: Request, ctx: C) => Promise<Response>) {
  return async (req: Request, ctx: C): Promise<Response> => {
    try {
      return await fn(req, ctx);
    } catch (err) {
      return toErrorResponse(err);
    }
  };
}

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

async function readTextLimited(req: Request, limit: number): Promise<string> {
  if (!req.body) return '';
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
  return Buffer.concat(chunks).toString('utf8');
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

/** Parses with a zod schema; failures become 422 with per-field messages. */
export function parseBody<T extends z.ZodType>(schema: T, data: unknown): z.infer<T> {
  return schema.parse(data);
}

/** Parses a positive integer id from a route parameter; anything else is 404. */
export function parseId(raw: string | undefined, what = 'record'): number {
  if (!raw || !/^[1-9][0-9]{0,15}$/.test(raw)) throw new ApiError('not_found', `No ${what} with id '${raw ?? ''}'.`);
  return Number(raw);
}
