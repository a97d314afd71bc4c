import type { Permission } from '@/lib/auth/policy';

export type NavItem = { href: string; label: string; permission: Permission; group?: 'admin' };

export const NAV_ITEMS: NavItem[] = [
  { href: '/projects', label: 'Projects', permission: 'projects:read' },
  { href: '/tubes', label: 'Tube library', permission: 'tubes:read' },
  { href: '/bench', label: 'Bench', permission: 'bench:write' },
  { href: '/reviews', label: 'Reviews', permission: 'reviews:read' },
  { href: '/admin/users', label: 'Users', permission: 'users:manage', group: 'admin' },
  { href: '/admin/outbox', label: 'Outbox', permission: 'outbox:read', group: 'admin' },
  { href: '/admin/audit', label: 'Audit log', permission: 'audit:read-all', group: 'admin' },
];
