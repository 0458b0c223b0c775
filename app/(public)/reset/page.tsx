import Link from 'next/link';
import { LinkRefused } from '@/components/public/link-refused';
import { ResetRequestForm } from '@/components/public/reset-request-form';
import { SetPasswordForm } from '@/components/public/set-password-form';
import { describeLink } from '@/lib/data/links';

export const metadata = { title: 'Reset password' };
export const dynamic = 'force-dynamic';

export default async function ResetPage({
  searchParams,
}: {
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const params = await searchParams;
  const token = typeof params.token === 'string' ? params.token : '';
  if (!token) {
    return (
      <>
        <h1 className="text-2xl font-semibold tracking-tight">Reset your password</h1>
        <p className="mt-1 mb-6 text-sm text-ink-500">
          We will e-mail you a link that works once and expires in an hour.
        </p>
        <ResetRequestForm />
        <p className="mt-6 text-center text-sm">
          <Link href="/login" className="text-glass-700 hover:underline">
            Back to sign in
          </Link>
        </p>
      </>
    );
  }
  const state = await describeLink({ token });
  return (
    <>
      <h1 className="mb-6 text-2xl font-semibold tracking-tight">Choose a new password</h1>
      {state.ok && state.purpose === 'reset' ? (
        <>
          <p className="-mt-4 mb-6 text-sm text-ink-500">For {state.email}.</p>
          <SetPasswordForm token={token} purpose="reset" />
        </>
      ) : (
        <LinkRefused
          message={state.ok ? 'This is not a password-reset link.' : state.message}
          retryHref="/reset"
          retryLabel="Ask for a new reset link"
        />
      )}
    </>
  );
}
