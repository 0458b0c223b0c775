import 'server-only';
import type { Transaction } from 'sequelize';
import { AuditEvent } from '@/models';
import { getDb } from '../db';

export async function recordAudit(
  {
    teamId,
    userId,
    action,
    target,
    detail,
  }: {
    teamId: number;
    userId: number | null;
    action: string;
    target?: string | null;
    detail?: Record<string, unknown> | null;
  },
  transaction?: Transaction,
): Promise<void> {
  await getDb();
  await AuditEvent.create({ teamId, userId, action, target: target ?? null, detail: detail ?? null }, { transaction });
}
