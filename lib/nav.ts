/** Navigation per role: one list, used by the header and checked by the browser tests. */
import type { Role } from '@/lib/domain';

export interface NavItem {
  href: string;
  label: string;
  role: Role | 'public';
}

export const NAV: NavItem[] = [
  { href: '/seasons', label: 'Seasons', role: 'public' },
  { href: '/safety', label: 'Safety', role: 'public' },
  { href: '/api-docs', label: 'API', role: 'public' },
  { href: '/me', label: 'My entries', role: 'entrant' },
  { href: '/me/machines', label: 'Machines', role: 'entrant' },
  { href: '/judging', label: 'Review desk', role: 'judge' },
  { href: '/organize', label: 'Organize', role: 'organizer' },
  { href: '/admin/users', label: 'Users', role: 'admin' },
  { href: '/admin/audit', label: 'Audit log', role: 'admin' },
  { href: '/admin/outbox', label: 'Outbox', role: 'admin' },
];

export function navFor(roles: readonly Role[] | undefined): NavItem[] {
  return NAV.filter((n) => n.role === 'public' || (roles ?? []).includes(n.role));
}
