/**
 * The data functions check the role themselves, so a page, action or future
 * handler that forgets the check still cannot leak or change anything.
 */
import { describe, expect, it } from 'vitest';
import { ApiError } from '@/lib/http';
import type { Caller } from '@/lib/auth';
import { listAuditEvents } from '@/lib/data/audit';
import { listOutbox } from '@/lib/data/outbox';
import { createInvitation, listInvitations } from '@/lib/data/links';
import { removeMember, updateMemberRole, updateTeam } from '@/lib/data/team';
import { AuthLink, User } from '@/models';
import { userOf } from '../helpers/api';

async function callerOf(who: 'viewer' | 'reviewer' | 'engineer' | 'admin' | 'otherAdmin'): Promise<Caller> {
  const u = await userOf(who);
  return { id: u.id, email: u.email, name: u.name, role: u.role, teamId: u.teamId as number, via: 'session' };
}

describe('data functions refuse roles without the permission', () => {
  for (const who of ['viewer', 'reviewer', 'engineer'] as const) {
    it(`${who}: audit, outbox, invitations, member and team changes are refused with 403 and nothing changes`, async () => {
      const caller = await callerOf(who);
      const target = await userOf('viewer');
      const attempts: Promise<unknown>[] = [
        listAuditEvents({ caller }),
        listOutbox({ caller }),
        listInvitations({ caller }),
        createInvitation({ caller, input: { email: `x-${who}@steerwise.test`, role: 'admin' } }),
        updateMemberRole({ caller, id: target.id, role: 'admin' }),
        removeMember({ caller, id: target.id }),
        updateTeam({ caller, input: { name: 'Taken over' } }),
      ];
      for (const attempt of attempts) {
        const err = await attempt.then(
          () => null,
          (e: unknown) => e,
        );
        expect(err).toBeInstanceOf(ApiError);
        expect((err as ApiError).status).toBe(403);
      }
      expect((await userOf('viewer')).role).toBe('viewer');
      expect(await AuthLink.count({ where: { email: `x-${who}@steerwise.test` } })).toBe(0);
    });
  }

  it("another team's admin cannot reach a demo-team member through the data functions either (404)", async () => {
    const caller = await callerOf('otherAdmin');
    const target = await userOf('engineer');
    await expect(updateMemberRole({ caller, id: target.id, role: 'viewer' })).rejects.toMatchObject({ status: 404 });
    await expect(removeMember({ caller, id: target.id })).rejects.toMatchObject({ status: 404 });
    expect((await User.findByPk(target.id))?.role).toBe('engineer');
  });
});
