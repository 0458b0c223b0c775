import { Card, CardHeader } from '@/components/ui/card';
import { PageHeader } from '@/components/ui/page-header';
import { Refusal } from '@/components/ui/refusal';
import { MembersTable } from '@/components/team/members-table';
import { Invitations } from '@/components/team/invitations';
import { TeamSettingsForm } from '@/components/team/team-settings';
import { requirePagePermission } from '@/lib/auth';
import { listInvitations } from '@/lib/data/links';
import { getTeam, listMembers } from '@/lib/data/team';
import { can, refusalMessage } from '@/lib/auth/permissions';

export const metadata = { title: 'Team' };

export default async function TeamPage() {
  const { user, allowed, message } = await requirePagePermission('team.read');
  if (!allowed) return <Refusal message={message} />;
  const canManage = can(user.role, 'team.manage');
  const [team, members, invitations] = await Promise.all([
    getTeam({ caller: user }),
    listMembers({ caller: user }),
    canManage ? listInvitations({ caller: user }) : Promise.resolve([]),
  ]);
  return (
    <>
      <PageHeader
        kicker="Team"
        title={team.name}
        description="Everyone here shares the team's arrays, datasets and estimates. Roles decide who may change what."
      />
      {!canManage ? (
        <p role="note" className="mb-4 rounded-md border border-amber-200 bg-amber-50 px-4 py-2.5 text-sm text-ink-800">
          {refusalMessage(user.role, 'team.manage')} You can see who is in the team.
        </p>
      ) : null}
      <Card aria-labelledby="members-title">
        <CardHeader
          id="members-title"
          title="Members"
          description={`${members.length} ${members.length === 1 ? 'person' : 'people'}`}
        />
        <MembersTable members={members} canManage={canManage} selfId={user.id} />
      </Card>
      {canManage ? (
        <div className="mt-6 grid gap-6 lg:grid-cols-[3fr_2fr]">
          <Card aria-labelledby="invitations-title">
            <CardHeader
              id="invitations-title"
              title="Invitations"
              description="The invitee gets an e-mail with a one-time link to set a password. Links expire after 7 days."
            />
            <Invitations invitations={invitations} />
          </Card>
          <Card aria-labelledby="settings-title">
            <CardHeader id="settings-title" title="Team settings" />
            <TeamSettingsForm team={team} />
          </Card>
        </div>
      ) : null}
    </>
  );
}
