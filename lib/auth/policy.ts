// Who may do what. Route handlers and pages name a permission; this table is the only place that maps
// permissions to roles (tests/integration/route-rules.ts checks every route against it).
import type { Role } from '@/models/user';

export const PERMISSIONS = {
  'app:use': ['admin', 'designer', 'technician', 'reviewer'],
  'users:manage': ['admin'],
  'outbox:read': ['admin'],
  'audit:read': ['admin', 'reviewer', 'designer'],
  'audit:read-all': ['admin'],
  'reviews:read': ['admin', 'reviewer', 'designer'],
  'tubes:read': ['admin', 'designer', 'technician', 'reviewer'],
  'tubes:write': ['admin', 'designer'],
  'tubes:edit-published': ['admin'],
  'projects:read': ['admin', 'designer', 'technician', 'reviewer'],
  'projects:write': ['admin', 'designer'],
  'bench:write': ['admin', 'technician'],
  'revisions:submit': ['admin', 'designer'],
  'revisions:decide': ['admin', 'reviewer'],
  'explore:read': ['admin', 'designer', 'technician', 'reviewer'],
  'explore:run': ['admin', 'designer'],
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof PERMISSIONS;

export function can(role: Role, permission: Permission): boolean {
  return (PERMISSIONS[permission] as readonly Role[]).includes(role);
}
