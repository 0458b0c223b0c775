import 'server-only';
import { ApiToken, User } from '@/models';
import { ApiError } from '../http';
import { recordAudit } from './record-audit';
import type { Caller } from '../auth';
import { getDb } from '../db';
import { toMemberDto, toTokenDto, type MemberDto, type TokenDto } from './dto';
import { hashPassword, verifyPassword } from '../auth/passwords';
import { randomSecret, sha256Hex } from '../auth/secrets';
import type { PasswordChangeInput, ProfileInput, TokenCreateInput } from '../validations/account';

async function loadSelf(caller: Caller): Promise<User> {
  await getDb();
  const user = await User.findOne({ where: { id: caller.id, teamId: caller.teamId } });
  if (!user) throw new ApiError('unauthenticated', 'Your account no longer exists; sign in again.');
  return user;
}

export async function getProfile({ caller }: { caller: Caller }): Promise<MemberDto & { teamId: number }> {
  const user = await loadSelf(caller);
  return { ...toMemberDto(user), teamId: user.teamId as number };
}

export async function updateProfile({ caller, input }: { caller: Caller; input: ProfileInput }): Promise<MemberDto> {
  const db = await getDb();
  return db.transaction(async (transaction) => {
    const user = await User.findOne({ where: { id: caller.id, teamId: caller.teamId }, transaction });
    if (!user) throw new ApiError('unauthenticated', 'Your account no longer exists; sign in again.');
    const before = user.name;
    user.name = input.name;
    await user.save({ transaction });
    await recordAudit(
      {
        teamId: caller.teamId,
        userId: caller.id,
        action: 'account.profile_updated',
        target: user.email,
        detail: { from: before, to: input.name },
      },
      transaction,
    );
    return toMemberDto(user);
  });
}

export async function changePassword({ caller, input }: { caller: Caller; input: PasswordChangeInput }): Promise<void> {
  const user = await loadSelf(caller);
  if (!(await verifyPassword(input.currentPassword, user.passwordHash))) {
    throw new ApiError('validation_failed', 'currentPassword: the current password is not correct.', {
      fields: { currentPassword: ['The current password is not correct.'] },
    });
  }
  const hash = await hashPassword(input.newPassword);
  const db = await getDb();
  await db.transaction(async (transaction) => {
    await User.update({ passwordHash: hash }, { where: { id: user.id }, transaction });
    await recordAudit(
      { teamId: caller.teamId, userId: caller.id, action: 'account.password_changed', target: user.email },
      transaction,
    );
  });
}

export async function listTokens({ caller }: { caller: Caller }): Promise<TokenDto[]> {
  await getDb();
  const tokens = await ApiToken.findAll({
    where: { userId: caller.id },
    order: [
      ['createdAt', 'DESC'],
      ['id', 'DESC'],
    ],
  });
  return tokens.map(toTokenDto);
}

/** Creates a token for a user; the secret is returned once and only its hash is stored. */
export async function issueToken({
  userId,
  teamId,
  name,
  actorId,
}: {
  userId: number;
  teamId: number;
  name: string;
  actorId: number | null;
}): Promise<{ token: string; record: TokenDto }> {
  const db = await getDb();
  const secret = randomSecret('sw_', 32);
  return db.transaction(async (transaction) => {
    const record = await ApiToken.create(
      { userId, name, tokenHash: sha256Hex(secret), prefix: secret.slice(0, 9) },
      { transaction },
    );
    await recordAudit(
      {
        teamId,
        userId: actorId,
        action: 'token.created',
        target: name,
        detail: { tokenId: record.id, prefix: record.prefix, forUserId: userId },
      },
      transaction,
    );
    return { token: secret, record: toTokenDto(record) };
  });
}

export async function createToken({
  caller,
  input,
}: {
  caller: Caller;
  input: TokenCreateInput;
}): Promise<{ token: string; record: TokenDto }> {
  await loadSelf(caller);
  return issueToken({ userId: caller.id, teamId: caller.teamId, name: input.name, actorId: caller.id });
}

export async function revokeToken({ caller, id }: { caller: Caller; id: number }): Promise<TokenDto> {
  const db = await getDb();
  return db.transaction(async (transaction) => {
    // Ownership in the query: someone else's token is simply not found.
    const token = await ApiToken.findOne({ where: { id, userId: caller.id }, transaction });
    if (!token) throw new ApiError('not_found', `No API token with id ${id} on your account.`);
    if (!token.revokedAt) {
      token.revokedAt = new Date();
      await token.save({ transaction });
      await recordAudit(
        {
          teamId: caller.teamId,
          userId: caller.id,
          action: 'token.revoked',
          target: token.name,
          detail: { tokenId: token.id, prefix: token.prefix },
        },
        transaction,
      );
    }
    return toTokenDto(token);
  });
}
