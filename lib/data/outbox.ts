import 'server-only';
import { Op } from 'sequelize';
import { OutboxMessage } from '@/models';
import { ApiError } from '../http';
import { assertPermission, type Caller } from '../auth';
import { getDb } from '../db';
import { toOutboxDto, type OutboxDto } from './dto';

/**
 * The local sink's captured mail. It is one mailbox for the whole
 * installation (the sink cannot tell teams apart), so admins see the
 * messages addressed to members of their team, plus invitations they sent
 * (see teamAddresses).
 */
export async function listOutbox({ caller, limit = 200 }: { caller: Caller; limit?: number }): Promise<OutboxDto[]> {
  assertPermission(caller, 'outbox.read');
  await getDb();
  const rows = await OutboxMessage.findAll({
    order: [
      ['receivedAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: 2000,
  });
  const visible = await teamAddresses(caller.teamId);
  return rows
    .filter((m) => addressedTo(m.to, visible))
    .slice(0, limit)
    .map(toOutboxDto);
}

export async function getOutboxMessage({ caller, id }: { caller: Caller; id: number }): Promise<OutboxDto> {
  assertPermission(caller, 'outbox.read');
  await getDb();
  const m = await OutboxMessage.findByPk(id);
  if (!m || !addressedTo(m.to, await teamAddresses(caller.teamId)))
    throw new ApiError('not_found', `No message with id ${id} in your team's outbox.`);
  return toOutboxDto(m);
}

/**
 * The addresses whose mail this team's admins may read: the team's members,
 * and the addresses of invitations the team sent unless that address now has
 * an account in another team (its mail, reset links included, belongs to
 * that team only).
 */
async function teamAddresses(teamId: number): Promise<Set<string>> {
  const { User, AuthLink } = await import('@/models');
  const members = await User.findAll({ where: { teamId }, attributes: ['email'] });
  const links = await AuthLink.findAll({ where: { teamId }, attributes: ['email'] });
  const linkEmails = [...new Set(links.map((l) => l.email.toLowerCase()))];
  const elsewhere = await User.findAll({
    where: { email: { [Op.in]: linkEmails }, teamId: { [Op.ne]: teamId } },
    attributes: ['email'],
  });
  const taken = new Set(elsewhere.map((u) => u.email.toLowerCase()));
  return new Set([...members.map((u) => u.email.toLowerCase()), ...linkEmails.filter((e) => !taken.has(e))]);
}

function addressedTo(to: string, addresses: Set<string>): boolean {
  const found = to.toLowerCase().match(/[^\s<>,"]+@[^\s<>,"]+/g) ?? [];
  return found.some((a) => addresses.has(a));
}
