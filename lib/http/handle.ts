import { toErrorResponse } from './errors';

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
