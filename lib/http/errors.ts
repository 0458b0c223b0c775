/**
 * The API's error contract (docs/conventions.md §7): the codes and their HTTP
 * statuses, ApiError, and the JSON error body, including zod errors as 422
 * with per-field messages.
 */
import { z } from 'zod';

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
