import { LinkRefused } from '@/components/public/link-refused';
import { SetPasswordForm } from '@/components/public/set-password-form';
import { describeLink } from '@/lib/data/links';

export const metadata = { title: 'Join your team' };
export const dynamic = 'force-dynamic';

export default async function InvitePage({
  searchParams,
}: {
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const params = await searchParams;
  const token = typeof params.token === 'string' ? params.token : '';
  const state = await describeLink({ token });
  return (
    <>
      <h1 className="text-2xl font-semibold tracking-tight">Join your team</h1>
      {state.ok && state.purpose === 'invite' ? (
        <>
          <p className="mt-1 mb-6 text-sm text-ink-500">
            {state.teamName} invited {state.email} as <strong className="font-medium text-ink-700">{state.role}</strong>
            . Choose a password to finish.
          </p>
          <SetPasswordForm token={token} purpose="invite" />
        </>
      ) : (
        <div className="mt-6">
          <LinkRefused
            message={state.ok ? 'This is not an invitation link.' : state.message}
            retryHref="/login"
            retryLabel="Go to sign in"
          />
          <p className="mt-3 text-sm text-ink-500">Ask your team admin to send a new invitation.</p>
        </div>
      )}
    </>
  );
}
