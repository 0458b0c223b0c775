import 'server-only';
import { Op } from 'sequelize';
import { AuditEvent, AuthLink, Team, User } from '@/models';
import type { Role } from '@/models/user';
import { ApiError } from '../http';
import { assertPermission, type Caller } from '../auth';
import { recordAudit } from './record-audit';
import { getDb } from '../db';
import { toInvitationDto, type InvitationDto } from './dto';
import { appUrl } from '../env';
import { sendMail } from '../mail/send';
import { hashPassword } from '../auth/passwords';
import { randomSecret, sha256Hex } from '../auth/secrets';
import type { LinkCompleteInput } from '../validations/account';
import type { InvitationInput } from '../validations/team';

export const INVITE_TTL_MS = 7 * 24 * 60 * 60 * 1000;
export const RESET_TTL_MS = 60 * 60 * 1000;

async function recordAuditId(
  event: Parameters<typeof recordAudit>[0],
  transaction: import('sequelize').Transaction,
): Promise<number> {
  const row = await AuditEvent.create(
    { ...event, target: event.target ?? null, detail: event.detail ?? null },
    { transaction },
  );
  return row.id;
}

/** Sends the mail; if that fails, removes the link and its audit event so nothing is kept. */
async function mailOrUndo(
  mail: { to: string; subject: string; text: string },
  linkId: number,
  auditId: number,
): Promise<void> {
  try {
    await sendMail(mail);
  } catch (err) {
    console.error('[steerwise] sending mail failed', err);
    const db = await getDb();
    await db.transaction(async (transaction) => {
      await AuditEvent.destroy({ where: { id: auditId }, transaction });
      await AuthLink.destroy({ where: { id: linkId }, transaction });
    });
    throw new ApiError(
      'mail_unavailable',
      'The e-mail could not be sent: the mail server is unavailable. Nothing was saved; try again later.',
    );
  }
}

export async function listInvitations({ caller }: { caller: Caller }): Promise<InvitationDto[]> {
  assertPermission(caller, 'team.manage');
  await getDb();
  const links = await AuthLink.findAll({
    where: { teamId: caller.teamId, purpose: 'invite' },
    order: [
      ['createdAt', 'DESC'],
      ['id', 'DESC'],
    ],
  });
  return links.map(toInvitationDto);
}

/** Creates an invitation and e-mails its one-time link; if the mail cannot be sent, nothing is kept. */
export async function createInvitation({
  caller,
  input,
  origin,
}: {
  caller: Caller;
  input: InvitationInput;
  origin?: string;
}): Promise<InvitationDto> {
  assertPermission(caller, 'team.manage');
  const db = await getDb();
  const existing = await User.findOne({ where: { email: input.email } });
  if (existing) {
    throw new ApiError(
      'conflict',
      `${input.email} already has a Steerwise account${existing.teamId === caller.teamId ? ' in your team' : ''}.`,
      {
        fields: { email: ['This address already has an account.'] },
      },
    );
  }
  const team = await Team.findByPk(caller.teamId);
  const secret = randomSecret('', 32);
  const link = `${appUrl(origin)}/invite?token=${secret}`;
  const { record, auditId } = await db.transaction(async (transaction) => {
    // Older pending invitations for the same address stop working.
    await AuthLink.update(
      { revokedAt: new Date() },
      {
        where: { teamId: caller.teamId, purpose: 'invite', email: input.email, usedAt: null, revokedAt: null },
        transaction,
      },
    );
    const record = await AuthLink.create(
      {
        purpose: 'invite',
        email: input.email,
        role: input.role,
        teamId: caller.teamId,
        createdById: caller.id,
        tokenHash: sha256Hex(secret),
        expiresAt: new Date(Date.now() + INVITE_TTL_MS),
      },
      { transaction },
    );
    const auditId = await recordAuditId(
      {
        teamId: caller.teamId,
        userId: caller.id,
        action: 'invitation.created',
        target: input.email,
        detail: { role: input.role, invitationId: record.id },
      },
      transaction,
    );
    return { record, auditId };
  });
  // Mail goes out after the commit (the local sink writes to the same database,
  // so sending inside the transaction would wait on our own lock).
  await mailOrUndo(
    {
      to: input.email,
      subject: `You are invited to ${team?.name ?? 'a team'} on Steerwise`,
      text: [
        `${caller.name} invited you to join ${team?.name ?? 'their team'} on Steerwise as ${input.role}.`,
        '',
        'Set your password and join with this link (it works once and expires in 7 days):',
        link,
        '',
        'If you did not expect this, ignore this message.',
      ].join('\n'),
    },
    record.id,
    auditId,
  );
  return toInvitationDto(record);
}

export async function revokeInvitation({ caller, id }: { caller: Caller; id: number }): Promise<InvitationDto> {
  assertPermission(caller, 'team.manage');
  const db = await getDb();
  return db.transaction(async (transaction) => {
    const link = await AuthLink.findOne({ where: { id, teamId: caller.teamId, purpose: 'invite' }, transaction });
    if (!link) throw new ApiError('not_found', `No invitation with id ${id} in your team.`);
    if (link.usedAt) throw new ApiError('conflict', 'This invitation has already been accepted.');
    if (!link.revokedAt) {
      link.revokedAt = new Date();
      await link.save({ transaction });
      await recordAudit(
        {
          teamId: caller.teamId,
          userId: caller.id,
          action: 'invitation.revoked',
          target: link.email,
          detail: { invitationId: link.id },
        },
        transaction,
      );
    }
    return toInvitationDto(link);
  });
}

/**
 * Sends a reset link if the address has an account. The caller always gets
 * the same answer, so the endpoint does not reveal which addresses exist.
 */
export async function requestPasswordReset({
  email,
  origin,
  ip,
}: {
  email: string;
  origin?: string;
  ip: string;
}): Promise<void> {
  const db = await getDb();
  const user = await User.findOne({ where: { email } });
  if (!user) return;
  const secret = randomSecret('', 32);
  const link = `${appUrl(origin)}/reset?token=${secret}`;
  const { record, auditId } = await db.transaction(async (transaction) => {
    await AuthLink.update(
      { revokedAt: new Date() },
      { where: { purpose: 'reset', email, usedAt: null, revokedAt: null }, transaction },
    );
    const record = await AuthLink.create(
      {
        purpose: 'reset',
        email,
        teamId: user.teamId as number,
        createdById: null,
        tokenHash: sha256Hex(secret),
        expiresAt: new Date(Date.now() + RESET_TTL_MS),
      },
      { transaction },
    );
    const auditId = await recordAuditId(
      {
        teamId: user.teamId as number,
        userId: user.id,
        action: 'password.reset_requested',
        target: email,
        detail: { ip },
      },
      transaction,
    );
    return { record, auditId };
  });
  await mailOrUndo(
    {
      to: email,
      subject: 'Reset your Steerwise password',
      text: [
        `Hello ${user.name},`,
        '',
        'Someone (hopefully you) asked to reset the password of your Steerwise account.',
        'Choose a new password with this link (it works once and expires in 1 hour):',
        link,
        '',
        'If you did not ask for this, ignore this message; your password stays as it is.',
      ].join('\n'),
    },
    record.id,
    auditId,
  );
}

export type LinkState =
  | { ok: true; purpose: 'invite' | 'reset'; email: string; role: Role | null; teamName: string }
  | { ok: false; code: 'not_found' | 'link_expired' | 'link_used'; message: string };

async function findLink(
  secret: string,
  transaction?: import('sequelize').Transaction,
): Promise<{ link: AuthLink | null; state: LinkState }> {
  const link = await AuthLink.findOne({ where: { tokenHash: sha256Hex(secret) }, transaction });
  if (!link || link.revokedAt) {
    return {
      link,
      state: {
        ok: false,
        code: 'not_found',
        message: 'This link is not valid. It may have been replaced by a newer one; ask for a new link.',
      },
    };
  }
  if (link.usedAt)
    return {
      link,
      state: {
        ok: false,
        code: 'link_used',
        message: 'This link has already been used. Links work only once; ask for a new one.',
      },
    };
  if (new Date(link.expiresAt) <= new Date()) {
    const what = link.purpose === 'invite' ? 'invitation' : 'reset link';
    return {
      link,
      state: { ok: false, code: 'link_expired', message: `This ${what} has expired. Ask for a new one.` },
    };
  }
  const team = await Team.findByPk(link.teamId as number, { transaction });
  return {
    link,
    state: { ok: true, purpose: link.purpose, email: link.email, role: link.role ?? null, teamName: team?.name ?? '' },
  };
}

/** For the /invite and /reset pages: is the link still good? */
export async function describeLink({ token }: { token: string }): Promise<LinkState> {
  await getDb();
  if (!token)
    return {
      ok: false,
      code: 'not_found',
      message: 'The link is missing its token. Open the full link from the e-mail.',
    };
  return (await findLink(token)).state;
}

/** Uses a one-time link: sets the password (reset) or creates the member (invite). */
export async function completeLink({
  input,
}: {
  input: LinkCompleteInput;
}): Promise<{ purpose: 'invite' | 'reset'; email: string }> {
  const db = await getDb();
  const hash = await hashPassword(input.password);
  return db.transaction(async (transaction) => {
    const { link, state } = await findLink(input.token, transaction);
    if (!state.ok || !link)
      throw new ApiError(state.ok ? 'not_found' : state.code, state.ok ? 'Link not found.' : state.message, {
        fields: { token: [state.ok ? 'Link not found.' : state.message] },
      });
    const now = new Date();
    // Claim the link atomically so two submissions cannot both use it.
    const [claimed] = await AuthLink.update(
      { usedAt: now },
      { where: { id: link.id, usedAt: null, revokedAt: null, expiresAt: { [Op.gt]: now } }, transaction },
    );
    if (claimed !== 1)
      throw new ApiError('link_used', 'This link has already been used. Links work only once; ask for a new one.');
    if (link.purpose === 'reset') {
      const user = await User.findOne({ where: { email: link.email }, transaction });
      if (!user) throw new ApiError('not_found', 'The account for this link no longer exists.');
      user.passwordHash = hash;
      await user.save({ transaction });
      await recordAudit(
        { teamId: user.teamId as number, userId: user.id, action: 'password.reset_completed', target: user.email },
        transaction,
      );
      return { purpose: 'reset' as const, email: user.email };
    }
    if (!input.name)
      throw new ApiError('validation_failed', 'name: enter your name.', { fields: { name: ['Enter your name.'] } });
    if (await User.findOne({ where: { email: link.email }, transaction })) {
      throw new ApiError('conflict', `${link.email} already has an account; sign in instead.`);
    }
    const user = await User.create(
      {
        email: link.email,
        name: input.name,
        passwordHash: hash,
        role: (link.role ?? 'viewer') as Role,
        teamId: link.teamId as number,
      },
      { transaction },
    );
    await recordAudit(
      {
        teamId: link.teamId as number,
        userId: user.id,
        action: 'invitation.accepted',
        target: user.email,
        detail: { role: user.role, invitationId: link.id },
      },
      transaction,
    );
    return { purpose: 'invite' as const, email: user.email };
  });
}
