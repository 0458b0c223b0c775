import type { ApiToken, AuditEvent, AuthLink, OutboxMessage, Team, User } from '@/models';
import type { Role } from '@/models/user';
import type { TeamSettings } from '@/models/team';

/** Plain objects returned by data functions and route handlers (never model instances or hashes). */
export type MemberDto = { id: number; email: string; name: string; role: Role; createdAt: string };
export type TokenDto = {
  id: number;
  name: string;
  prefix: string;
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
};
export type InvitationDto = {
  id: number;
  email: string;
  role: Role | null;
  createdAt: string;
  expiresAt: string;
  status: 'pending' | 'accepted' | 'expired' | 'revoked';
};
export type OutboxDto = {
  id: number;
  to: string;
  from: string;
  subject: string;
  text: string;
  html: string | null;
  receivedAt: string;
};
export type AuditDto = {
  id: number;
  action: string;
  target: string | null;
  detail: Record<string, unknown> | null;
  createdAt: string;
  user: { id: number; name: string; email: string } | null;
};
export type TeamDto = { id: number; name: string; settings: TeamSettings };

const iso = (d: Date | string | null | undefined): string | null => (d ? new Date(d).toISOString() : null);

export const toMemberDto = (u: User): MemberDto => ({
  id: u.id,
  email: u.email,
  name: u.name,
  role: u.role,
  createdAt: iso(u.createdAt)!,
});

export const toTokenDto = (t: ApiToken): TokenDto => ({
  id: t.id,
  name: t.name,
  prefix: t.prefix,
  createdAt: iso(t.createdAt)!,
  lastUsedAt: iso(t.lastUsedAt),
  revokedAt: iso(t.revokedAt),
});

export function invitationStatus(l: AuthLink, now = new Date()): InvitationDto['status'] {
  if (l.usedAt) return 'accepted';
  if (l.revokedAt) return 'revoked';
  if (new Date(l.expiresAt) <= now) return 'expired';
  return 'pending';
}

export const toInvitationDto = (l: AuthLink): InvitationDto => ({
  id: l.id,
  email: l.email,
  role: l.role ?? null,
  createdAt: iso(l.createdAt)!,
  expiresAt: iso(l.expiresAt)!,
  status: invitationStatus(l),
});

export const toOutboxDto = (m: OutboxMessage): OutboxDto => ({
  id: m.id,
  to: m.to,
  from: m.from,
  subject: m.subject,
  text: m.text,
  html: m.html ?? null,
  receivedAt: iso(m.receivedAt)!,
});

export const toAuditDto = (e: AuditEvent & { user?: User | null }): AuditDto => ({
  id: e.id,
  action: e.action,
  target: e.target ?? null,
  detail: (typeof e.detail === 'string' ? JSON.parse(e.detail) : e.detail) ?? null,
  createdAt: iso(e.createdAt)!,
  user: e.user ? { id: e.user.id, name: e.user.name, email: e.user.email } : null,
});

export const toTeamDto = (t: Team): TeamDto => ({ id: t.id, name: t.name, settings: t.settings });
