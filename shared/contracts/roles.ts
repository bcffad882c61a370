/**
 * Roles a user holds in a lab, and what each may do. One table serves the API's checks, the client's
 * navigation and the authorization-matrix test, so they cannot drift apart.
 */
export const ROLES = ['admin', 'experimenter', 'analyst', 'reviewer'] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Lab admin',
  experimenter: 'Experimenter',
  analyst: 'Analyst',
  reviewer: 'Reviewer',
};

const everyone: readonly Role[] = ROLES;

export const PERMISSIONS = {
  /** See the lab, its people, campaigns, shots, projectiles and rigs. */
  'lab:read': everyone,
  'members:manage': ['admin'],
  'invitations:manage': ['admin'],
  /** The local fake mail server's inbox (development and tests only). */
  'outbox:read': ['admin'],
  'campaigns:write': ['admin', 'experimenter'],
  'shots:write': ['admin', 'experimenter'],
  /** Bring back a shot deleted by mistake. */
  'shots:restore': ['admin'],
  'analyses:write': ['admin', 'analyst'],
  'library:write': ['admin', 'analyst'],
  /** Send a shot with a finished analysis for review. */
  'reviews:request': ['admin', 'experimenter', 'analyst'],
  'reviews:decide': ['reviewer'],
  /** See the review queue of the lab. */
  'reviews:queue': ['admin', 'reviewer'],
  'audit:read': ['admin', 'reviewer'],
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof PERMISSIONS;

export function can(role: Role | undefined | null, permission: Permission): boolean {
  return role != null && (PERMISSIONS[permission] as readonly Role[]).includes(role);
}
