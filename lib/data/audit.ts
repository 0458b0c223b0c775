import 'server-only';
import { AuditEvent, User } from '@/models';
import { assertPermission, type Caller } from '../auth';
import { getDb } from '../db';
import { toAuditDto, type AuditDto } from './dto';

export async function listAuditEvents({
  caller,
  limit = 500,
}: {
  caller: Caller;
  limit?: number;
}): Promise<AuditDto[]> {
  assertPermission(caller, 'audit.read');
  await getDb();
  const events = await AuditEvent.findAll({
    where: { teamId: caller.teamId },
    include: [{ model: User, as: 'user', attributes: ['id', 'name', 'email'] }],
    order: [
      ['createdAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: Math.min(Math.max(limit, 1), 2000),
  });
  return events.map((e) => toAuditDto(e as AuditEvent & { user?: User | null }));
}
