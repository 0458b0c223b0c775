import 'server-only';
import { Team, User } from '@/models';
import { ApiError } from '../http';
import { assertPermission, type Caller } from '../auth';
import { recordAudit } from './record-audit';
import { getDb } from '../db';
import { toMemberDto, toTeamDto, type MemberDto, type TeamDto } from './dto';
import type { TeamSettingsInput } from '../validations/team';
import type { Role } from '@/models/user';

export async function getTeam({ caller }: { caller: Caller }): Promise<TeamDto> {
  assertPermission(caller, 'team.read');
  await getDb();
  const team = await Team.findByPk(caller.teamId);
  if (!team) throw new ApiError('not_found', 'Your team no longer exists.');
  return toTeamDto(team);
}

export async function updateTeam({ caller, input }: { caller: Caller; input: TeamSettingsInput }): Promise<TeamDto> {
  assertPermission(caller, 'team.manage');
  const db = await getDb();
  return db.transaction(async (transaction) => {
    const team = await Team.findByPk(caller.teamId, { transaction });
    if (!team) throw new ApiError('not_found', 'Your team no longer exists.');
    const before = toTeamDto(team);
    if (input.name !== undefined) team.name = input.name;
    if (input.allowViewerDatasetExport !== undefined)
      team.settings = { ...team.settings, allowViewerDatasetExport: input.allowViewerDatasetExport };
    await team.save({ transaction });
    await recordAudit(
      {
        teamId: caller.teamId,
        userId: caller.id,
        action: 'team.updated',
        target: team.name,
        detail: { before: { name: before.name, ...before.settings }, after: { name: team.name, ...team.settings } },
      },
      transaction,
    );
    return toTeamDto(team);
  });
}

export async function listMembers({ caller }: { caller: Caller }): Promise<MemberDto[]> {
  assertPermission(caller, 'team.read');
  await getDb();
  const users = await User.findAll({ where: { teamId: caller.teamId }, order: [['name', 'ASC']] });
  return users.map(toMemberDto);
}

async function adminCount(teamId: number, transaction: import('sequelize').Transaction): Promise<number> {
  return User.count({ where: { teamId, role: 'admin' }, transaction });
}

export async function updateMemberRole({
  caller,
  id,
  role,
}: {
  caller: Caller;
  id: number;
  role: Role;
}): Promise<MemberDto> {
  assertPermission(caller, 'team.manage');
  const db = await getDb();
  return db.transaction(async (transaction) => {
    const member = await User.findOne({ where: { id, teamId: caller.teamId }, transaction });
    if (!member) throw new ApiError('not_found', `No member with id ${id} in your team.`);
    if (member.role === 'admin' && role !== 'admin' && (await adminCount(caller.teamId, transaction)) <= 1) {
      throw new ApiError('conflict', 'A team needs at least one admin: make someone else admin first.');
    }
    const from = member.role;
    member.role = role;
    await member.save({ transaction });
    await recordAudit(
      {
        teamId: caller.teamId,
        userId: caller.id,
        action: 'member.role_changed',
        target: member.email,
        detail: { from, to: role },
      },
      transaction,
    );
    return toMemberDto(member);
  });
}

export async function removeMember({ caller, id }: { caller: Caller; id: number }): Promise<void> {
  assertPermission(caller, 'team.manage');
  const db = await getDb();
  await db.transaction(async (transaction) => {
    const member = await User.findOne({ where: { id, teamId: caller.teamId }, transaction });
    if (!member) throw new ApiError('not_found', `No member with id ${id} in your team.`);
    if (member.id === caller.id) throw new ApiError('conflict', 'You cannot remove yourself; ask another admin.');
    if (member.role === 'admin' && (await adminCount(caller.teamId, transaction)) <= 1) {
      throw new ApiError('conflict', 'A team needs at least one admin.');
    }
    await recordAudit(
      {
        teamId: caller.teamId,
        userId: caller.id,
        action: 'member.removed',
        target: member.email,
        detail: { role: member.role },
      },
      transaction,
    );
    await member.destroy({ transaction });
  });
}
