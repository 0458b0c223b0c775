import { LoginForm } from '@/components/public/login-form';

export const metadata = { title: 'Sign in' };

function safeCallback(raw: string | string[] | undefined): string {
  const value = Array.isArray(raw) ? raw[0] : raw;
  if (!value) return '/';
  try {
    const url = new URL(value, 'http://local');
    // Only same-site paths: never redirect to another origin after sign-in.
    return url.origin === 'http://local' || value.startsWith('http') ? url.pathname + url.search : '/';
  } catch {
    return '/';
  }
}

export default async function LoginPage({
  searchParams,
}: {
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const params = await searchParams;
  const error = params.error
    ? 'That e-mail and password do not match an account. Check both, or reset your password.'
    : undefined;
  const notice =
    params.done === 'reset'
      ? 'Your password is set. Sign in with it now.'
      : params.done === 'invite'
        ? 'Welcome aboard. Sign in with your new password.'
        : null;
  return (
    <>
      <h1 className="text-2xl font-semibold tracking-tight">Sign in</h1>
      <p className="mt-1 mb-6 text-sm text-ink-500">Use the e-mail address your team admin invited.</p>
      {notice ? (
        <p
          role="status"
          className="mb-4 rounded-md border border-glass-200 bg-glass-50 px-3 py-2 text-sm text-glass-800"
        >
          {notice}
        </p>
      ) : null}
      <LoginForm callbackUrl={safeCallback(params.callbackUrl)} initialError={error} />
    </>
  );
}
