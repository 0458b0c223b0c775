import 'server-only';
import { OutboxMessage } from '@/models';
import { ApiError } from '../http';
import { assertPermission, type Caller } from '../auth';
import { getDb } from '../db';
import { toOutboxDto, type OutboxDto } from './dto';

/**
 * The local sink's captured mail. It is one mailbox for the whole
 * installation (the sink cannot tell teams apart), so admins see the
 * messages addressed to members of their team, plus invitations they sent.
 */
export async function listOutbox({ caller, limit = 200 }: { caller: Caller; limit?: number }): Promise<OutboxDto[]> {
  assertPermission(caller, 'outbox.read');
  await getDb();
  const rows = await OutboxMessage.findAll({ order: [['receivedAt', 'DESC'], ['id', 'DESC']], limit: 2000 });
  const visible = await teamAddresses(caller.teamId);
  return rows.filter((m) => addressedTo(m.to, visible)).slice(0, limit).map(toOutboxDto);
}

export async function getOutboxMessage({ caller, id }: { caller: Caller; id: number }): Promise<OutboxDto> {
  assertPermission(caller, 'outbox.read');
  await getDb();
  const m = await OutboxMessage.findByPk(id);
  if (!m || !addressedTo(m.to, await teamAddresses(caller.teamId))) throw new ApiError('not_found', `No message with id ${id} in your team's outbox.`);
  return toOutboxDto(m);
}

async function teamAddresses(teamId: number): Promise<Set<string>> {
  const { User, AuthLink } = await import('@/models');
  const users = await User.findAll({ where: { teamId }, attributes: ['email'] });
  const links = await AuthLink.findAll({ where: { teamId }, attributes: ['email'] });
  return new Set([...users, ...links].map((r) => r.email.toLowerCase()));
}

function addressedTo(to: string, addresses: Set<string>): boolean {
  const found = to.toLowerCase().match(/[^\s<>,"]+@[^\s<>,"]+/g) ?? [];
  return found.some((a) => addresses.has(a));
}
