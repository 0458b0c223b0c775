import 'server-only';
/**
 * E-mail hand-off: a Handoff row, a signed expiring download link
 * (lib/handoff/signed-link.ts, HMAC with the server secret, purpose
 * "handoff", subject = handoff id) and a message through the shell's mailer.
 * When the sender may manage the team (an admin), a recipient without an
 * account also gets the shell's invitation (a one-time link into the
 * sender's team, role viewer; an admin can raise it). An engineer's hand-off
 * never invites: invitations need team.manage, and the download link works
 * without an account.
 * If the mail cannot be sent, the row, the invitation and their audit
 * entries are removed again.
 */
import { Op } from 'sequelize';
import { ArrayDesign, AuditEvent, AuthLink, Handoff, Team, User } from '@/models';
import { ApiError } from '../http';
import { assertPermission, type Caller } from '../auth';
import { can } from '../auth/permissions';
import { recordAudit } from './record-audit';
import { getDb } from '../db';
import { appUrl, authSecret } from '../env';
import { sendMail } from '../mail/send';
import { randomSecret, sha256Hex } from '../auth/secrets';
import { buildArrayBundle } from '../handoff/export';
import { createSignedToken, verifySignedToken, SignedLinkError } from '../handoff/signed-link';
import type { HandoffSendInput } from '../validations/handoff';
import { INVITE_TTL_MS } from './links';

export const HANDOFF_PURPOSE = 'handoff';

/** How long a hand-off link works: STEERWISE_HANDOFF_TTL_HOURS, default 7 days. */
export function handoffTtlSeconds(): number {
  const hours = Number(process.env.STEERWISE_HANDOFF_TTL_HOURS);
  return Math.round((Number.isFinite(hours) && hours > 0 ? hours : 7 * 24) * 3600);
}

export type HandoffDto = {
  id: number;
  arrayId: number;
  arrayName: string;
  revision: number;
  recipientEmail: string;
  note: string | null;
  datasets: number[];
  runs: number[];
  sentBy: { id: number; name: string } | null;
  createdAt: string;
  expiresAt: string;
  downloadCount: number;
  invited: boolean;
};

function toDto(h: Handoff, arrayName: string, sender: User | null): HandoffDto {
  const o = (typeof h.options === 'string' ? JSON.parse(h.options) : h.options) as {
    datasets?: number[];
    runs?: number[];
    invited?: boolean;
  };
  return {
    id: h.id,
    arrayId: h.arrayId as number,
    arrayName,
    revision: h.arrayRevision,
    recipientEmail: h.recipientEmail,
    note: h.note ?? null,
    datasets: o.datasets ?? [],
    runs: o.runs ?? [],
    sentBy: sender ? { id: sender.id, name: sender.name } : null,
    createdAt: new Date(h.createdAt).toISOString(),
    expiresAt: new Date(h.expiresAt).toISOString(),
    downloadCount: h.downloadCount,
    invited: Boolean(o.invited),
  };
}

export function handoffLinks(token: string, origin?: string): { download: string; importPage: string } {
  const base = appUrl(origin);
  return { download: `${base}/api/handoff/${token}`, importPage: `${base}/handoff?link=${encodeURIComponent(token)}` };
}

/** Sends a bundle by e-mail. Engineers and admins. 201 with the hand-off; 503 (nothing kept) when the mail server fails. */
export async function sendHandoff({
  caller,
  input,
  origin,
}: {
  caller: Caller;
  input: HandoffSendInput;
  origin?: string;
}): Promise<HandoffDto & { link: string }> {
  assertPermission(caller, 'arrays.edit');
  const db = await getDb();
  const array = await ArrayDesign.findOne({ where: { id: input.arrayId, teamId: caller.teamId } });
  if (!array)
    throw new ApiError('not_found', `No array with id ${input.arrayId} in your team.`, {
      fields: { arrayId: ['not found in your team'] },
    });
  // Build once now: checks the revision, the runs and datasets and the caller's right to send them.
  const built = await buildArrayBundle({
    caller,
    arrayId: array.id,
    selection: { revision: input.revision, datasetIds: input.datasets, runIds: input.runs },
    audit: false,
  });
  const team = await Team.findByPk(caller.teamId);
  const recipient = input.recipientEmail;
  const member = await User.findOne({ where: { email: recipient } });
  const ttl = handoffTtlSeconds();
  const expiresAt = new Date(Date.now() + ttl * 1000);
  // Inviting someone into the team is team.manage (admins); engineers send the link only.
  const invite = member || !can(caller.role, 'team.manage') ? null : randomSecret('', 32);

  const { handoff, auditIds, linkId } = await db.transaction(async (transaction) => {
    const handoff = await Handoff.create(
      {
        teamId: caller.teamId,
        arrayId: array.id,
        arrayRevision: built.revision,
        options: { datasets: input.datasets ?? [], runs: input.runs ?? [], invited: Boolean(invite) },
        recipientEmail: recipient,
        note: input.note || null,
        sentById: caller.id,
        expiresAt,
      },
      { transaction },
    );
    const auditIds: number[] = [];
    const a = await AuditEvent.create(
      {
        teamId: caller.teamId,
        userId: caller.id,
        action: 'handoff.sent',
        target: recipient,
        detail: {
          handoffId: handoff.id,
          arrayId: array.id,
          revision: built.revision,
          datasets: input.datasets ?? [],
          runs: input.runs ?? [],
          invited: Boolean(invite),
          expiresAt: expiresAt.toISOString(),
        },
      },
      { transaction },
    );
    auditIds.push(a.id);
    let linkId: number | null = null;
    if (invite) {
      // The shell's invitation mechanism: a one-time link whose hash is stored; older pending ones stop working.
      await AuthLink.update(
        { revokedAt: new Date() },
        {
          where: { teamId: caller.teamId, purpose: 'invite', email: recipient, usedAt: null, revokedAt: null },
          transaction,
        },
      );
      const link = await AuthLink.create(
        {
          purpose: 'invite',
          email: recipient,
          role: 'viewer',
          teamId: caller.teamId,
          createdById: caller.id,
          tokenHash: sha256Hex(invite),
          expiresAt: new Date(Date.now() + INVITE_TTL_MS),
        },
        { transaction },
      );
      linkId = link.id;
      const b = await AuditEvent.create(
        {
          teamId: caller.teamId,
          userId: caller.id,
          action: 'invitation.created',
          target: recipient,
          detail: { role: 'viewer', invitationId: link.id, via: 'handoff', handoffId: handoff.id },
        },
        { transaction },
      );
      auditIds.push(b.id);
    }
    return { handoff, auditIds, linkId };
  });

  const token = createSignedToken({
    purpose: HANDOFF_PURPOSE,
    subject: String(handoff.id),
    ttlSeconds: ttl,
    secret: authSecret(),
  });
  const links = handoffLinks(token, origin);
  const contents = [
    input.runs?.length ? `${input.runs.length} estimate run(s)` : '',
    built.manifest.files.some((f) => f.kind === 'dataset') ? 'their data' : '',
  ]
    .filter(Boolean)
    .join(' with ');
  const subject = `${caller.name} sent you "${array.name}" revision ${built.revision} on Steerwise`;
  const text = [
    `${caller.name} (${caller.email}) of ${team?.name ?? 'a Steerwise team'} sent you a Steerwise hand-off bundle:`,
    `"${array.name}", revision ${built.revision}${contents ? `, with ${contents}` : ''}.`,
    '',
    ...(input.note ? [`Note from ${caller.name}:`, ...input.note.split('\n').map((l) => `  ${l}`), ''] : []),
    `Download the bundle (the link works until ${expiresAt.toUTCString()}):`,
    links.download,
    '',
    'If you use Steerwise, sign in and import it into your team from this page:',
    links.importPage,
    '',
    'The bundle is a zip: summary.txt and the SVG charts can be read without the app, and manifest.json lists a SHA-256 for every file.',
    ...(invite
      ? [
          '',
          `You do not have a Steerwise account yet, so ${caller.name} also invited you to ${team?.name ?? 'their team'}: look for the invitation e-mail.`,
        ]
      : []),
  ].join('\n');

  try {
    await sendMail({ to: recipient, subject, text });
    if (invite) {
      await sendMail({
        to: recipient,
        subject: `You are invited to ${team?.name ?? 'a team'} on Steerwise`,
        text: [
          `${caller.name} invited you to join ${team?.name ?? 'their team'} on Steerwise as viewer, to look at the hand-off "${array.name}".`,
          '',
          'Set your password and join with this link (it works once and expires in 7 days):',
          `${appUrl(origin)}/invite?token=${invite}`,
          '',
          'If you did not expect this, ignore this message.',
        ].join('\n'),
      });
    }
  } catch (err) {
    console.error('[steerwise] sending the hand-off mail failed', err);
    await db.transaction(async (transaction) => {
      await AuditEvent.destroy({ where: { id: { [Op.in]: auditIds } }, transaction });
      if (linkId) await AuthLink.destroy({ where: { id: linkId }, transaction });
      await handoff.destroy({ transaction });
    });
    throw new ApiError(
      'mail_unavailable',
      'The e-mail could not be sent: the mail server is unavailable. Nothing was saved; try again later.',
    );
  }
  const sender = await User.findByPk(caller.id);
  return { ...toDto(handoff, array.name, sender), link: links.download };
}

export async function listHandoffs({ caller }: { caller: Caller }): Promise<HandoffDto[]> {
  assertPermission(caller, 'arrays.read');
  await getDb();
  const rows = await Handoff.findAll({
    where: { teamId: caller.teamId },
    order: [
      ['createdAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: 200,
  });
  const arrays = await ArrayDesign.findAll({
    where: { id: { [Op.in]: rows.map((r) => r.arrayId as number) } },
    attributes: ['id', 'name'],
  });
  const senders = await User.findAll({
    where: { id: { [Op.in]: rows.map((r) => r.sentById as number).filter(Boolean) } },
  });
  return rows.map((h) =>
    toDto(
      h,
      arrays.find((a) => a.id === h.arrayId)?.name ?? '(deleted array)',
      senders.find((u) => u.id === h.sentById) ?? null,
    ),
  );
}

/**
 * The bundle behind a signed link, built afresh from the stored hand-off with
 * the sender's rights. No sign-in needed: the signed token is the permission.
 * Refusals: 404 for a link that is altered, malformed or unknown; 422
 * link_expired when the link has expired.
 */
export async function downloadHandoff({
  token,
}: {
  token: string;
}): Promise<{ zip: Uint8Array; fileName: string; sha256: string; handoff: Handoff }> {
  await getDb();
  let subject: string;
  try {
    subject = verifySignedToken({ token, purpose: HANDOFF_PURPOSE, secret: authSecret() }).subject;
  } catch (err) {
    if (err instanceof SignedLinkError) {
      if (err.problem === 'expired')
        throw new ApiError(
          'link_expired',
          `This hand-off link has expired (${err.message.replace(/^the link /, '')}). Ask the sender for a new one.`,
        );
      throw new ApiError(
        'not_found',
        `This hand-off link is not valid: ${err.message}. Open the full link from the e-mail, or ask the sender for a new one.`,
      );
    }
    throw err;
  }
  const handoff = await Handoff.findByPk(Number(subject));
  if (!handoff) throw new ApiError('not_found', 'This hand-off no longer exists. Ask the sender for a new one.');
  if (new Date(handoff.expiresAt) <= new Date())
    throw new ApiError(
      'link_expired',
      `This hand-off link expired at ${new Date(handoff.expiresAt).toISOString()}. Ask the sender for a new one.`,
    );
  const sender = handoff.sentById ? await User.findByPk(handoff.sentById as number) : null;
  if (!sender || sender.teamId !== handoff.teamId)
    throw new ApiError(
      'not_found',
      'The sender of this hand-off is no longer in their team, so the link no longer works.',
    );
  const o = (typeof handoff.options === 'string' ? JSON.parse(handoff.options) : handoff.options) as {
    datasets?: number[];
    runs?: number[];
  };
  const caller: Caller = {
    id: sender.id,
    email: sender.email,
    name: sender.name,
    role: sender.role,
    teamId: sender.teamId as number,
    via: 'session',
  };
  const built = await buildArrayBundle({
    caller,
    arrayId: handoff.arrayId as number,
    selection: { revision: handoff.arrayRevision, datasetIds: o.datasets, runIds: o.runs },
    audit: false,
  });
  await Handoff.increment('downloadCount', { where: { id: handoff.id } });
  await recordAudit({
    teamId: handoff.teamId as number,
    userId: null,
    action: 'handoff.downloaded',
    target: handoff.recipientEmail,
    detail: { handoffId: handoff.id, sha256: built.sha256 },
  });
  return { zip: built.zip, fileName: built.fileName, sha256: built.sha256, handoff };
}
