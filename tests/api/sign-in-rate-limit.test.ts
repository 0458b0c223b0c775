/**
 * Sign-in is rate-limited per e-mail and per client address: after the limit
 * of failed attempts, POST /api/auth/callback/credentials answers 429 before
 * next-auth even sees the password.
 */
import { describe, expect, it } from 'vitest';
import { verifyCredentials } from '@/lib/auth';
import { DEMO_PASSWORD } from '@/lib/demo/seed';
import { signInLimits } from '@/lib/auth/rate-limit';
import { POST } from '@/app/api/auth/[...nextauth]/route';
import { json } from '../helpers/api';

function signInRequest(email: string, ip: string) {
  return new Request('http://localhost:3000/api/auth/callback/credentials', {
    method: 'POST',
    headers: { 'content-type': 'application/x-www-form-urlencoded', 'x-forwarded-for': ip },
    body: new URLSearchParams({ email, password: 'whatever', csrfToken: 'x', json: 'true' }),
  });
}
const ctx = { params: Promise.resolve({ nextauth: ['callback', 'credentials'] }) };

describe('sign-in rate limit', () => {
  it('after 5 failures for one e-mail the next attempt is 429 with Retry-After and a clear message', async () => {
    expect(signInLimits.perEmail()).toBe(5);
    for (let i = 0; i < 5; i++)
      expect(
        await verifyCredentials({ email: 'engineer@steerwise.test', password: `wrong-${i}`, ip: '192.0.2.10' }),
      ).toBeNull();
    const res = await POST(signInRequest('engineer@steerwise.test', '192.0.2.99'), ctx);
    expect(res.status).toBe(429);
    expect(Number(res.headers.get('retry-after'))).toBeGreaterThan(0);
    const body = await json(res);
    expect(body.error).toMatchObject({
      code: 'rate_limited',
      message: expect.stringMatching(/^Too many failed sign-in attempts\. Wait \d+ minutes?/),
    });
  });

  it('the e-mail limit does not lock out other people', async () => {
    // Different e-mail, fresh address: the handler goes on to next-auth (not a 429 from us).
    const { handleSignInLimit } = await import('@/lib/auth/sign-in-limit');
    expect(
      await handleSignInLimit(signInRequest('reviewer@steerwise.test', '192.0.2.50'), ['callback', 'credentials']),
    ).toBeNull();
  });

  it('after the per-address limit of failures, every e-mail from that address is blocked', async () => {
    const { handleSignInLimit } = await import('@/lib/auth/sign-in-limit');
    expect(signInLimits.perIp()).toBe(30); // the default
    process.env.STEERWISE_SIGNIN_LIMIT_IP = '8'; // configurable; lowered to keep the test short
    for (let i = 0; i < 8; i++)
      await verifyCredentials({ email: `guess-${i}@steerwise.test`, password: 'x', ip: '198.51.100.7' });
    const blocked = await handleSignInLimit(signInRequest('admin@steerwise.test', '198.51.100.7'), [
      'callback',
      'credentials',
    ]);
    expect(blocked?.status).toBe(429);
    expect(
      await handleSignInLimit(signInRequest('admin@steerwise.test', '198.51.100.8'), ['callback', 'credentials']),
    ).toBeNull();
    delete process.env.STEERWISE_SIGNIN_LIMIT_IP;
  });

  it('a successful sign-in clears the e-mail counter', async () => {
    for (let i = 0; i < 4; i++)
      await verifyCredentials({ email: 'viewer@steerwise.test', password: 'nope', ip: '203.0.113.1' });
    expect(
      await verifyCredentials({ email: 'viewer@steerwise.test', password: DEMO_PASSWORD, ip: '203.0.113.1' }),
    ).not.toBeNull();
    for (let i = 0; i < 4; i++)
      await verifyCredentials({ email: 'viewer@steerwise.test', password: 'nope', ip: '203.0.113.1' });
    const { handleSignInLimit } = await import('@/lib/auth/sign-in-limit');
    expect(
      await handleSignInLimit(signInRequest('viewer@steerwise.test', '203.0.113.2'), ['callback', 'credentials']),
    ).toBeNull();
  });

  it('other next-auth routes are never limited here', async () => {
    const { handleSignInLimit } = await import('@/lib/auth/sign-in-limit');
    expect(await handleSignInLimit(signInRequest('engineer@steerwise.test', '192.0.2.99'), ['signout'])).toBeNull();
  });
});
