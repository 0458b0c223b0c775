import type { Sequelize } from 'sequelize';
import { AuditEvent, AuthLink, Team, User, initModels } from '@/models';
import type { Role } from '@/models/user';
import { hashPassword } from '../auth/passwords';
import { seedDemoArrays } from './arrays';
import { seedRecordings } from './recordings';
import { seedDemoStudy } from './studies';
import { seedDemoBearingTimeRecord } from './bearing-time';
import { randomSecret, sha256Hex } from '../auth/secrets';

/**
 * Demo data. Every place, person and vessel here is invented: Kestrel Sound
 * Laboratory is a fictional coastal acoustics lab at the fictional harbour
 * town of Port Alder; Gannet Point Radar Range is a fictional test range and
 * serves as the second team for cross-team checks.
 */
export const DEMO_PASSWORD = 'kestrel-sound-demo';

export const demoTeam = { name: 'Kestrel Sound Laboratory' };
export const demoUsers: { email: string; name: string; role: Role }[] = [
  { email: 'admin@steerwise.test', name: 'Maren Aldous', role: 'admin' },
  { email: 'engineer@steerwise.test', name: 'Tobin Hartree', role: 'engineer' },
  { email: 'reviewer@steerwise.test', name: 'Ilse Carrow', role: 'reviewer' },
  { email: 'viewer@steerwise.test', name: 'Ruari Penhale', role: 'viewer' },
];

export const otherTeam = { name: 'Gannet Point Radar Range' };
export const otherUsers: { email: string; name: string; role: Role }[] = [
  { email: 'range-admin@steerwise.test', name: 'Odile Fenwick', role: 'admin' },
];

export type SeedResult = { teamId: number; otherTeamId: number; users: Record<string, number>; created: boolean };

/** Idempotent: running it again changes nothing that is already there. */
export async function seedDemo(sequelize: Sequelize): Promise<SeedResult> {
  initModels(sequelize);
  const hash = await hashPassword(DEMO_PASSWORD);
  return sequelize.transaction(async (transaction) => {
    const [team, teamCreated] = await Team.findOrCreate({
      where: { name: demoTeam.name },
      defaults: { name: demoTeam.name, settings: { allowViewerDatasetExport: false } },
      transaction,
    });
    const [other, otherCreated] = await Team.findOrCreate({
      where: { name: otherTeam.name },
      defaults: { name: otherTeam.name, settings: { allowViewerDatasetExport: true } },
      transaction,
    });
    const users: Record<string, number> = {};
    for (const [t, list] of [
      [team, demoUsers],
      [other, otherUsers],
    ] as const) {
      for (const u of list) {
        const [row] = await User.findOrCreate({
          where: { email: u.email },
          defaults: { ...u, passwordHash: hash, teamId: t.id },
          transaction,
        });
        users[u.email] = row.id;
      }
    }
    if (teamCreated) {
      const admin = users['admin@steerwise.test'];
      const day = 24 * 60 * 60 * 1000;
      const t0 = Date.now() - 6 * day;
      const events: { action: string; target: string; detail: Record<string, unknown>; at: number; userId: number }[] =
        [
          {
            action: 'team.created',
            target: team.name,
            detail: { site: 'Port Alder harbour wall, hut 3' },
            at: t0,
            userId: admin,
          },
          ...demoUsers.slice(1).map((u, i) => ({
            action: 'member.added',
            target: u.email,
            detail: { role: u.role },
            at: t0 + (i + 1) * 3_600_000,
            userId: admin,
          })),
          {
            action: 'team.updated',
            target: team.name,
            detail: { note: 'Viewers may not download datasets' },
            at: t0 + 2 * day,
            userId: admin,
          },
          {
            action: 'invitation.created',
            target: 'harbour-hydrographer@steerwise.test',
            detail: { role: 'viewer' },
            at: t0 + 5 * day,
            userId: admin,
          },
        ];
      for (const e of events) {
        await AuditEvent.create(
          {
            teamId: team.id,
            userId: e.userId,
            action: e.action,
            target: e.target,
            detail: e.detail,
            createdAt: new Date(e.at),
          },
          { transaction },
        );
      }
      // A pending invitation (its link was never mailed, so it cannot be used).
      await AuthLink.create(
        {
          purpose: 'invite',
          email: 'harbour-hydrographer@steerwise.test',
          role: 'viewer',
          teamId: team.id,
          createdById: admin,
          tokenHash: sha256Hex(randomSecret('', 32)),
          expiresAt: new Date(Date.now() + 2 * day),
          createdAt: new Date(t0 + 5 * day),
        },
        { transaction },
      );
    }
    if (otherCreated) {
      await AuditEvent.create(
        {
          teamId: other.id,
          userId: users['range-admin@steerwise.test'],
          action: 'team.created',
          target: other.name,
          detail: { site: 'Gannet Point, north butt' },
        },
        { transaction },
      );
    }
    await seedDemoArrays({ teamId: team.id, users, transaction });
    await seedRecordings({ teamId: team.id, uploadedById: users['engineer@steerwise.test'] ?? null, transaction });
    await seedDemoStudy({ teamId: team.id, createdById: users['engineer@steerwise.test'] ?? null, transaction });
    await seedDemoBearingTimeRecord({
      teamId: team.id,
      uploadedById: users['engineer@steerwise.test'] ?? null,
      transaction,
    });
    return { teamId: team.id, otherTeamId: other.id, users, created: teamCreated };
  });
}
