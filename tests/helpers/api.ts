/**
 * Helpers for calling exported route handlers directly with real cookies and
 * tokens: a next-auth JWT session cookie (signed with the test secret), the
 * next-auth CSRF cookie with its matching header, or a bearer token.
 */
import { createHash, randomBytes } from 'node:crypto';
import { encode } from 'next-auth/jwt';
import { User } from '@/models';

export const ORIGIN = 'http://localhost:3000';

export type Who = 'anonymous' | 'viewer' | 'reviewer' | 'engineer' | 'admin' | 'otherAdmin';
export const everyone: Who[] = ['anonymous', 'viewer', 'reviewer', 'engineer', 'admin', 'otherAdmin'];

export const emails: Record<Exclude<Who, 'anonymous'>, string> = {
  viewer: 'viewer@steerwise.test',
  reviewer: 'reviewer@steerwise.test',
  engineer: 'engineer@steerwise.test',
  admin: 'admin@steerwise.test',
  otherAdmin: 'range-admin@steerwise.test',
};

export async function userOf(who: Exclude<Who, 'anonymous'>): Promise<User> {
  const user = await User.findOne({ where: { email: emails[who] } });
  if (!user) throw new Error(`seed user ${who} missing`);
  return user;
}

export async function sessionCookieFor(user: User): Promise<string> {
  const jwt = await encode({
    token: {
      sub: String(user.id),
      uid: user.id,
      role: user.role,
      teamId: user.teamId as number,
      email: user.email,
      name: user.name,
    },
    secret: process.env.NEXTAUTH_SECRET!,
  });
  return `next-auth.session-token=${jwt}`;
}

export function csrfPair(): { cookie: string; header: string } {
  const token = randomBytes(16).toString('hex');
  const hash = createHash('sha256').update(`${token}${process.env.NEXTAUTH_SECRET}`).digest('hex');
  return { cookie: `next-auth.csrf-token=${encodeURIComponent(`${token}|${hash}`)}`, header: token };
}

/** Headers for a signed-in browser call: session cookie, and for writes the CSRF cookie and header. */
export async function browserHeaders(who: Who, opts: { csrf?: boolean } = {}): Promise<Record<string, string>> {
  if (who === 'anonymous') return {};
  const user = await userOf(who);
  const cookies = [await sessionCookieFor(user)];
  const headers: Record<string, string> = {};
  if (opts.csrf !== false) {
    const pair = csrfPair();
    cookies.push(pair.cookie);
    headers['x-csrf-token'] = pair.header;
  }
  headers.cookie = cookies.join('; ');
  return headers;
}

export function req(
  method: string,
  pathname: string,
  { body, headers = {} }: { body?: unknown; headers?: Record<string, string> } = {},
): Request {
  const init: RequestInit = { method, headers: { ...headers } };
  if (body !== undefined) {
    init.body = typeof body === 'string' ? body : JSON.stringify(body);
    (init.headers as Record<string, string>)['content-type'] ??= 'application/json';
  }
  return new Request(`${ORIGIN}${pathname}`, init);
}

export const params = <T extends Record<string, string>>(p: T) => ({ params: Promise.resolve(p) });

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- test bodies are read loosely and asserted field by field
export async function json(res: Response): Promise<any> {
  const text = await res.text();
  return text ? JSON.parse(text) : null;
}
