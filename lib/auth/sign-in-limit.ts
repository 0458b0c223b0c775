import 'server-only';
import { ApiError, errorResponse } from '../http';
import { clientIp, signInBlockedFor } from './rate-limit';

/**
 * For POST /api/auth/callback/credentials: answers 429 (with Retry-After)
 * while this e-mail or client address has too many failed sign-ins in the
 * window; otherwise returns null and the request goes on to next-auth.
 */
export async function handleSignInLimit(req: Request, segments: string[]): Promise<Response | null> {
  if (segments.join('/') !== 'callback/credentials') return null;
  let email = '';
  try {
    const form = await req.clone().formData();
    email = String(form.get('email') ?? '');
  } catch {
    return null; // next-auth answers malformed bodies itself
  }
  const ip = clientIp(req.headers);
  const wait = await signInBlockedFor({ email: email.trim().toLowerCase(), ip });
  if (!wait) return null;
  const minutes = Math.ceil(wait / 60);
  return errorResponse(
    new ApiError(
      'rate_limited',
      `Too many failed sign-in attempts. Wait ${minutes} minute${minutes === 1 ? '' : 's'} and try again, or reset your password.`,
      {
        headers: { 'retry-after': String(wait) },
      },
    ),
  );
}
