import 'server-only';
import type { NextAuthOptions } from 'next-auth';
import { getServerSession } from 'next-auth';
import CredentialsProvider from 'next-auth/providers/credentials';
import { getToken } from 'next-auth/jwt';
import { redirect } from 'next/navigation';
import { ApiToken, User, type Role } from '@/models';
import { ApiError } from '../http';
import { recordAudit } from '../data/record-audit';
import { getDb } from '../db';
import { authSecret } from '../env';
import { dummyHash, verifyPassword } from './passwords';
import { can, refusalMessage, type Permission } from './permissions';
import { clearSignInFailures, clientIp, recordSignInFailure } from './rate-limit';
import { safeEqual, sha256Hex } from './secrets';

/** The signed-in person, as every handler and data function sees them. */
export type Caller = { id: number; email: string; name: string; role: Role; teamId: number; via: 'session' | 'token' };

function toCaller(user: User, via: Caller['via']): Caller {
  return { id: user.id, email: user.email, name: user.name, role: user.role, teamId: user.teamId as number, via };
}

export async function verifyCredentials({
  email,
  password,
  ip,
}: {
  email: string;
  password: string;
  ip: string;
}): Promise<User | null> {
  await getDb();
  const normalised = email.trim().toLowerCase();
  const user = await User.findOne({ where: { email: normalised } });
  const ok = await verifyPassword(password, user?.passwordHash ?? dummyHash());
  if (!user || !ok) {
    await recordSignInFailure({ email: normalised, ip });
    if (user)
      await recordAudit({
        teamId: user.teamId as number,
        userId: user.id,
        action: 'signin.failed',
        target: user.email,
        detail: { ip },
      });
    return null;
  }
  await clearSignInFailures({ email: normalised });
  await recordAudit({
    teamId: user.teamId as number,
    userId: user.id,
    action: 'signin.succeeded',
    target: user.email,
    detail: { ip },
  });
  return user;
}

export const authOptions: NextAuthOptions = {
  // A getter so the secret is read at request time, not when the build imports this module.
  get secret() {
    return authSecret();
  },
  session: { strategy: 'jwt', maxAge: 12 * 60 * 60 },
  pages: { signIn: '/login', error: '/login' },
  providers: [
    CredentialsProvider({
      name: 'E-mail and password',
      credentials: { email: { label: 'E-mail', type: 'email' }, password: { label: 'Password', type: 'password' } },
      async authorize(credentials, req) {
        const email = String(credentials?.email ?? '');
        const password = String(credentials?.password ?? '');
        if (!email || !password) return null;
        const user = await verifyCredentials({
          email,
          password,
          ip: clientIp((req?.headers ?? {}) as Record<string, string>),
        });
        if (!user) return null;
        return {
          id: String(user.id),
          email: user.email,
          name: user.name,
          role: user.role,
          teamId: user.teamId as number,
        };
      },
    }),
  ],
  callbacks: {
    async jwt({ token, user }) {
      if (user) {
        token.uid = Number(user.id);
        token.role = user.role;
        token.teamId = user.teamId;
      }
      return token;
    },
    async session({ session, token }) {
      if (token.uid && token.role && token.teamId) {
        session.user = { ...session.user, id: token.uid, role: token.role, teamId: token.teamId };
      }
      return session;
    },
  },
};

function parseCookies(header: string | null): Record<string, string> {
  const out: Record<string, string> = {};
  if (!header) return out;
  for (const part of header.split(';')) {
    const i = part.indexOf('=');
    if (i < 0) continue;
    const name = part.slice(0, i).trim();
    if (name) out[name] = decodeURIComponent(part.slice(i + 1).trim());
  }
  return out;
}

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/**
 * CSRF proof for cookie-authenticated writes (double submit, signed): the
 * `x-csrf-token` header must equal the token inside next-auth's HttpOnly
 * csrf cookie, whose hash is checked with the server secret; and when the
 * browser sends an Origin header it must be this site's origin.
 */
export function checkCsrf(req: Request, cookies: Record<string, string>): void {
  const origin = req.headers.get('origin');
  if (origin) {
    const host = req.headers.get('x-forwarded-host') ?? req.headers.get('host') ?? new URL(req.url).host;
    let originHost = '';
    try {
      originHost = new URL(origin).host;
    } catch {
      /* unparseable origin is refused below */
    }
    if (originHost !== host)
      throw new ApiError('csrf_failed', `Cross-site request refused: origin ${origin} is not this site.`);
  }
  const header = req.headers.get('x-csrf-token');
  const cookie = cookies['__Host-next-auth.csrf-token'] ?? cookies['next-auth.csrf-token'];
  if (!header)
    throw new ApiError(
      'csrf_failed',
      'Missing CSRF token: send the x-csrf-token header with cookie-authenticated changes.',
    );
  if (!cookie) throw new ApiError('csrf_failed', 'Missing CSRF cookie: reload the page and try again.');
  const [token, hash] = cookie.split('|');
  if (!token || !hash || !safeEqual(hash, sha256Hex(`${token}${authSecret()}`)) || !safeEqual(header, token)) {
    throw new ApiError('csrf_failed', 'The CSRF token does not match: reload the page and try again.');
  }
}

/**
 * Resolves who is calling an API route: `Authorization: Bearer <token>` (hash
 * lookup) or the next-auth session cookie. Role and team are read fresh from
 * the database on every request, so role changes and removals apply at once.
 */
export async function getCaller(req: Request): Promise<Caller> {
  await getDb();
  const auth = req.headers.get('authorization');
  if (auth) {
    const m = /^Bearer\s+(\S+)\s*$/i.exec(auth);
    if (!m) throw new ApiError('unauthenticated', 'The Authorization header must be "Bearer <token>".');
    const token = await ApiToken.findOne({ where: { tokenHash: sha256Hex(m[1]) } });
    if (!token || token.revokedAt)
      throw new ApiError('unauthenticated', 'The API token is not valid or has been revoked.');
    const user = await User.findByPk(token.userId as number);
    if (!user) throw new ApiError('unauthenticated', 'The API token belongs to no current user.');
    // "Last used" to the minute: a write per request would put every API call in line for SQLite's write lock.
    const now = new Date();
    if (!token.lastUsedAt || now.getTime() - token.lastUsedAt.getTime() >= 60_000) {
      token.lastUsedAt = now;
      await token.save({ fields: ['lastUsedAt'] });
    }
    return toCaller(user, 'token');
  }
  const cookies = parseCookies(req.headers.get('cookie'));
  const jwt = await getToken({
    req: { headers: Object.fromEntries(req.headers.entries()), cookies } as unknown as Parameters<
      typeof getToken
    >[0]['req'],
    secret: authSecret(),
  });
  if (!jwt?.uid)
    throw new ApiError('unauthenticated', 'Sign in, or send an API token as "Authorization: Bearer <token>".');
  const user = await User.findByPk(jwt.uid);
  if (!user) throw new ApiError('unauthenticated', 'Your account no longer exists; sign in again.');
  if (!SAFE_METHODS.has(req.method.toUpperCase())) checkCsrf(req, cookies);
  return toCaller(user, 'session');
}

/** getCaller plus a permission check: 403 with "Your role (viewer) cannot …". */
export async function requireApiPermission(req: Request, permission: Permission): Promise<Caller> {
  const caller = await getCaller(req);
  if (!can(caller.role, permission)) throw new ApiError('forbidden', refusalMessage(caller.role, permission));
  return caller;
}

/** For server components and actions: the signed-in user, read fresh from the database, or a redirect to /login. */
export async function requireUser(): Promise<Caller> {
  const session = await getServerSession(authOptions);
  if (!session?.user?.id) redirect('/login');
  await getDb();
  const user = await User.findByPk(session.user.id);
  if (!user) redirect('/login');
  return toCaller(user, 'session');
}

/** For pages: the user and whether the role is allowed; pages show a refusal panel when not. */
export async function requirePagePermission(
  permission: Permission,
): Promise<{ user: Caller; allowed: boolean; message: string }> {
  const user = await requireUser();
  return { user, allowed: can(user.role, permission), message: refusalMessage(user.role, permission) };
}

export function assertPermission(caller: Caller, permission: Permission): void {
  if (!can(caller.role, permission)) throw new ApiError('forbidden', refusalMessage(caller.role, permission));
}
