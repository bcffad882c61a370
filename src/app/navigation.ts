import { can, type Permission, type Role } from '../../shared/contracts/roles.ts';

export interface NavItem { to: string; label: string; permission: Permission; description: string }

/** The lab's sections; each shows only to roles that may use it (same permission table as the API). */
export const LAB_SECTIONS: NavItem[] = [
  { to: 'campaigns', label: 'Campaigns', permission: 'lab:read', description: 'Campaigns and their shots' },
  { to: 'review-queue', label: 'Review queue', permission: 'reviews:queue', description: 'Shots waiting for sign-off' },
  { to: 'library', label: 'Projectiles & rigs', permission: 'lab:read', description: 'Projectiles and gate rigs' },
  { to: 'people', label: 'People', permission: 'lab:read', description: 'Members and invitations' },
  { to: 'audit', label: 'Audit trail', permission: 'audit:read', description: 'Who did what, when' },
  { to: 'outbox', label: 'Mail outbox', permission: 'outbox:read', description: 'Mail the local test mail server received' },
];

export const sectionsFor = (role: Role) => LAB_SECTIONS.filter((s) => can(role, s.permission));
