import { Card, CardHeader } from '@/components/ui/card';
import { PageHeader } from '@/components/ui/page-header';
import { ProfileForm } from '@/components/account/profile-form';
import { PasswordForm } from '@/components/account/password-form';
import { Tokens } from '@/components/account/tokens';
import { requireUser } from '@/lib/auth';
import { getProfile, listTokens } from '@/lib/data/account';

export const metadata = { title: 'Account' };

export default async function AccountPage() {
  const user = await requireUser();
  const [profile, tokens] = await Promise.all([getProfile({ caller: user }), listTokens({ caller: user })]);
  return (
    <>
      <PageHeader
        kicker="Account"
        title={profile.name}
        description={`Signed in as ${profile.email}, ${profile.role} in your team.`}
      />
      <div className="grid gap-6 lg:grid-cols-2">
        <Card aria-labelledby="profile-title">
          <CardHeader id="profile-title" title="Profile" />
          <ProfileForm name={profile.name} email={profile.email} />
        </Card>
        <Card aria-labelledby="password-title">
          <CardHeader id="password-title" title="Password" />
          <PasswordForm />
        </Card>
      </div>
      <Card className="mt-6" aria-labelledby="tokens-title">
        <CardHeader
          id="tokens-title"
          title="API tokens"
          description="Personal tokens for scripts and the v1 API. Only a hash is stored; revoke any token you no longer use."
        />
        <Tokens initial={tokens} />
      </Card>
    </>
  );
}
