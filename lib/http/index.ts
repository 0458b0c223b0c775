/**
 * What every route handler uses: the error contract (errors.ts), the
 * handler wrapper (handle.ts) and body reading (body.ts). Multipart file
 * uploads are read by multipart.ts, imported directly where a route takes one.
 */
export * from './errors';
export * from './handle';
export * from './body';
