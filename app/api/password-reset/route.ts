import { ApiError, handle, readJson } from '@/lib/http';
import { requestPasswordReset } from '@/lib/data/links';
import { allowHit, clientIp } from '@/lib/auth/rate-limit';
import { resetRequestSchema } from '@/lib/validations/account';

const WINDOW_MS = 15 * 60 * 1000;

/** Anonymous. Always 202 for a well-formed address, whether or not it has an account. */
export const POST = handle(async (req) => {
  const { email } = resetRequestSchema.parse(await readJson(req, 10_000));
  const ip = clientIp(req.headers);
  const allowed =
    (await allowHit({ key: `reset:email:${email}`, limit: 3, windowMs: WINDOW_MS })) &&
    (await allowHit({ key: `reset:ip:${ip}`, limit: 20, windowMs: WINDOW_MS }));
  if (!allowed)
    throw new ApiError('rate_limited', 'Too many reset requests. Wait 15 minutes and try again.', {
      headers: { 'retry-after': '900' },
    });
  await requestPasswordReset({ email, origin: new URL(req.url).origin, ip });
  return Response.json(
    { status: 'sent', message: 'If that address has an account, a reset link is on its way.' },
    { status: 202 },
  );
});
