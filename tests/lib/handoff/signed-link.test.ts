import { createHmac } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { SignedLinkError, createSignedToken, verifySignedToken } from '@/lib/handoff/signed-link';

const secret = 'test-secret-for-links';
const t0 = new Date('2026-03-01T10:00:00Z');

function problemOf(fn: () => unknown): string {
  try {
    fn();
  } catch (err) {
    expect(err).toBeInstanceOf(SignedLinkError);
    return (err as SignedLinkError).problem;
  }
  throw new Error('token was accepted');
}

describe('signed links', () => {
  it('round-trips purpose, subject and expiry', () => {
    const token = createSignedToken({ purpose: 'bundle', subject: 'handoff-42', ttlSeconds: 3600, secret, now: t0 });
    const claims = verifySignedToken({ token, purpose: 'bundle', secret, now: new Date(t0.getTime() + 3599_000) });
    expect(claims.subject).toBe('handoff-42');
    expect(claims.expiresAt.toISOString()).toBe('2026-03-01T11:00:00.000Z');
  });

  it('matches an HMAC-SHA256 computed independently (RFC 2104 via node:crypto)', () => {
    const token = createSignedToken({ purpose: 'bundle', subject: 'x', ttlSeconds: 60, secret, now: t0 });
    const [payload, signature] = token.split('.');
    expect(signature).toBe(createHmac('sha256', secret).update(payload).digest('base64url'));
  });

  it('refuses an expired link', () => {
    const token = createSignedToken({ purpose: 'bundle', subject: 'x', ttlSeconds: 60, secret, now: t0 });
    expect(
      problemOf(() => verifySignedToken({ token, purpose: 'bundle', secret, now: new Date(t0.getTime() + 60_000) })),
    ).toBe('expired');
  });

  it('refuses a tampered payload, a tampered signature and another secret', () => {
    const token = createSignedToken({ purpose: 'bundle', subject: 'handoff-1', ttlSeconds: 60, secret, now: t0 });
    const [payload, signature] = token.split('.');
    const forged = Buffer.from(Buffer.from(payload, 'base64url').toString().replace('handoff-1', 'handoff-2')).toString(
      'base64url',
    );
    expect(
      problemOf(() => verifySignedToken({ token: `${forged}.${signature}`, purpose: 'bundle', secret, now: t0 })),
    ).toBe('bad-signature');
    const flipped = signature.slice(0, -2) + (signature.endsWith('AA') ? 'BB' : 'AA');
    expect(
      problemOf(() => verifySignedToken({ token: `${payload}.${flipped}`, purpose: 'bundle', secret, now: t0 })),
    ).toBe('bad-signature');
    expect(problemOf(() => verifySignedToken({ token, purpose: 'bundle', secret: 'other', now: t0 }))).toBe(
      'bad-signature',
    );
  });

  it('refuses a link made for another purpose, and malformed input', () => {
    const token = createSignedToken({ purpose: 'invite', subject: 'x', ttlSeconds: 60, secret, now: t0 });
    expect(problemOf(() => verifySignedToken({ token, purpose: 'bundle', secret, now: t0 }))).toBe('wrong-purpose');
    expect(problemOf(() => verifySignedToken({ token: 'nodot', purpose: 'bundle', secret }))).toBe('malformed');
    expect(problemOf(() => verifySignedToken({ token: '.abc', purpose: 'bundle', secret }))).toBe('malformed');
  });
});
