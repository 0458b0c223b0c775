import NextAuth from 'next-auth';
import { authOptions } from '@/lib/auth';
import { handleSignInLimit } from '@/lib/auth/sign-in-limit';

const nextAuthHandler = NextAuth(authOptions);

type Ctx = { params: Promise<{ nextauth: string[] }> };

export async function GET(req: Request, ctx: Ctx) {
  return nextAuthHandler(req, ctx);
}

/** Sign-in attempts are refused with 429 before reaching next-auth while the e-mail or address is rate-limited. */
export async function POST(req: Request, ctx: Ctx) {
  const limited = await handleSignInLimit(req, (await ctx.params).nextauth);
  if (limited) return limited;
  return nextAuthHandler(req, ctx);
}
