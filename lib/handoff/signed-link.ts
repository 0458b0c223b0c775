/**
 * Signed, expiring tokens for download links sent by e-mail.
 *
 * A token is `<payload>.<signature>`, both base64url. The payload is JSON
 * `{ p: purpose, s: subject id, e: expiry (Unix seconds), n: nonce }` and the
 * signature is HMAC-SHA256 over the payload text with a server secret
 * (RFC 2104 HMAC; the construction is common practice for stateless links).
 * Verification is constant-time and checks purpose and expiry.
 */
import { createHmac, randomBytes, timingSafeEqual } from 'node:crypto';

export interface SignedLinkClaims {
  purpose: string;
  subject: string;
  expiresAt: Date;
}

export type SignedLinkProblem = 'malformed' | 'bad-signature' | 'expired' | 'wrong-purpose';

export class SignedLinkError extends Error {
  readonly problem: SignedLinkProblem;
  constructor(problem: SignedLinkProblem, message: string) {
    super(message);
    this.name = 'SignedLinkError';
    this.problem = problem;
  }
}

function sign(payload: string, secret: string): Buffer {
  return createHmac('sha256', secret).update(payload).digest();
}

export function createSignedToken(options: {
  purpose: string;
  subject: string;
  ttlSeconds: number;
  secret: string;
  now?: Date;
}): string {
  const { purpose, subject, ttlSeconds, secret } = options;
  if (!secret) throw new Error('createSignedToken needs a non-empty secret');
  if (!(ttlSeconds > 0)) throw new RangeError(`ttlSeconds must be positive, got ${ttlSeconds}`);
  const now = options.now ?? new Date();
  const claims = {
    p: purpose,
    s: subject,
    e: Math.floor(now.getTime() / 1000) + Math.floor(ttlSeconds),
    n: randomBytes(9).toString('base64url'),
  };
  const payload = Buffer.from(JSON.stringify(claims)).toString('base64url');
  return `${payload}.${sign(payload, secret).toString('base64url')}`;
}

export function verifySignedToken(options: {
  token: string;
  purpose: string;
  secret: string;
  now?: Date;
}): SignedLinkClaims {
  const { token, purpose, secret } = options;
  const parts = token.split('.');
  if (parts.length !== 2 || !parts[0] || !parts[1])
    throw new SignedLinkError('malformed', 'the link is incomplete or malformed');
  const [payload, signature] = parts;
  const expected = sign(payload, secret);
  const given = Buffer.from(signature, 'base64url');
  if (given.length !== expected.length || !timingSafeEqual(given, expected)) {
    throw new SignedLinkError('bad-signature', 'the link signature does not match: it was altered or is not ours');
  }
  let claims: { p?: unknown; s?: unknown; e?: unknown };
  try {
    claims = JSON.parse(Buffer.from(payload, 'base64url').toString('utf8'));
  } catch {
    throw new SignedLinkError('malformed', 'the link payload is not readable');
  }
  if (typeof claims.p !== 'string' || typeof claims.s !== 'string' || typeof claims.e !== 'number') {
    throw new SignedLinkError('malformed', 'the link payload is missing fields');
  }
  if (claims.p !== purpose)
    throw new SignedLinkError('wrong-purpose', `the link is for '${claims.p}', not '${purpose}'`);
  const now = options.now ?? new Date();
  if (now.getTime() / 1000 >= claims.e) {
    throw new SignedLinkError('expired', `the link expired at ${new Date(claims.e * 1000).toISOString()}`);
  }
  return { purpose: claims.p, subject: claims.s, expiresAt: new Date(claims.e * 1000) };
}
