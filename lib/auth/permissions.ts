import type { Role } from '@/models/user';

/**
 * What each role may do. The server checks these in every handler and data
 * function; the UI only uses them to decide what to show.
 */
export const permissions = {
  'team.read': ['admin', 'engineer', 'reviewer', 'viewer'],
  'team.manage': ['admin'],
  'outbox.read': ['admin'],
  'audit.read': ['admin'],
  'arrays.read': ['admin', 'engineer', 'reviewer', 'viewer'],
  'arrays.edit': ['admin', 'engineer'],
  'datasets.read': ['admin', 'engineer', 'reviewer', 'viewer'],
  'datasets.upload': ['admin', 'engineer'],
  'estimates.run': ['admin', 'engineer'],
  'studies.run': ['admin', 'engineer'],
  'review.comment': ['admin', 'engineer', 'reviewer'],
  'review.approve': ['admin', 'reviewer'],
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof permissions;

export function can(role: Role, permission: Permission): boolean {
  return (permissions[permission] as readonly Role[]).includes(role);
}

/** Plain-language phrases for refusals: "Your role (viewer) cannot manage team members." */
export const permissionPhrase: Record<Permission, string> = {
  'team.read': 'see the team',
  'team.manage': 'manage team members and invitations',
  'outbox.read': 'read the outbox',
  'audit.read': 'read the audit log',
  'arrays.read': 'see arrays',
  'arrays.edit': 'create or edit arrays',
  'datasets.read': 'see datasets',
  'datasets.upload': 'upload datasets',
  'estimates.run': 'run estimates',
  'studies.run': 'run studies',
  'review.comment': 'comment on reviews',
  'review.approve': 'approve reviews',
};

export function refusalMessage(role: Role, permission: Permission): string {
  return `Your role (${role}) cannot ${permissionPhrase[permission]}.`;
}
