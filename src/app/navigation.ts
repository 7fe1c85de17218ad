import type { RoleCode } from '../../shared/auth';
import { homeLabel } from '../../shared/vocabulary';

export type NavItem = { to: string; label: string; roles: readonly RoleCode[] | 'any' };

/** The navigation of each role; the server enforces the same rules on every route. */
export const navItems: NavItem[] = [
  { to: '/', label: homeLabel('admin'), roles: ['admin', 'ops', 'analyst', 'exec'] },
  { to: '/', label: homeLabel('manager'), roles: ['manager'] },
  { to: '/calibrate', label: 'Calibration', roles: ['analyst', 'manager', 'admin'] },
  { to: '/imports', label: 'Imports', roles: ['admin', 'ops', 'manager'] },
  { to: '/schedules', label: 'Schedules', roles: ['ops', 'admin'] },
  { to: '/jobs', label: 'Job history', roles: ['ops', 'admin'] },
  { to: '/digests', label: 'Digests', roles: 'any' },
  { to: '/my-digests', label: 'My digests', roles: ['manager', 'exec'] },
  { to: '/alerts', label: 'Alerts', roles: 'any' },
  { to: '/deliveries', label: 'Mail deliveries', roles: ['ops', 'admin'] },
  { to: '/outbox', label: 'Outbox', roles: ['ops', 'admin'] },
  { to: '/admin/people', label: 'People & ownership', roles: ['admin'] },
  { to: '/admin/audit', label: 'Audit log', roles: ['admin'] },
  { to: '/admin/tokens', label: 'API tokens', roles: ['admin'] },
  { to: '/admin/webhooks', label: 'Webhooks', roles: ['admin'] },
  { to: '/admin/landing', label: 'The Landing', roles: ['admin'] },
];

export function navFor(role: RoleCode): NavItem[] {
  return navItems.filter((item) => item.roles === 'any' || item.roles.includes(role));
}
