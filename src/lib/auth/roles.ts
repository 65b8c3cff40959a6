/** Roles and what each may reach. Pure: used by the middleware, pages, endpoints and tests. */
export const ROLES = ['nurse', 'charge', 'intensivist', 'outreach', 'admin'] as const;
export type Role = (typeof ROLES)[number];

export const CLINICAL_ROLES: readonly Role[] = ['nurse', 'charge', 'intensivist', 'outreach'];

export const ROLE_LABELS: Record<Role, string> = {
  nurse: 'Bedside nurse',
  charge: 'Charge nurse',
  intensivist: 'Intensivist',
  outreach: 'Outreach team',
  admin: 'Administrator',
};

/** Nurses and charge nurses work in one unit; the other clinical roles see every unit. */
export function spansUnits(role: Role): boolean {
  return role === 'intensivist' || role === 'outreach';
}

export interface NavItem { href: string; label: string; roles: readonly Role[] }

/** The navigation, by role. Add an entry when a screen lands; a role sees only what it may open. */
export const NAV_ITEMS: readonly NavItem[] = [
  { href: '/board', label: 'Ward board', roles: CLINICAL_ROLES },
  { href: '/', label: 'Units', roles: CLINICAL_ROLES },
  { href: '/patients', label: 'Patients', roles: CLINICAL_ROLES },
  { href: '/pleth', label: 'Strip check', roles: CLINICAL_ROLES },
  { href: '/escalations', label: 'Outreach queue', roles: CLINICAL_ROLES },
  { href: '/admin/users', label: 'Staff', roles: ['admin'] },
  { href: '/admin/units', label: 'Units and beds', roles: ['admin'] },
  { href: '/admin/audit', label: 'Audit', roles: ['admin'] },
  { href: '/admin/settings', label: 'Escalation settings', roles: ['admin'] },
  { href: '/admin/mail', label: 'Mail', roles: ['admin'] },
  { href: '/admin/devices', label: 'Device keys', roles: ['admin'] },
  { href: '/admin/gateways', label: 'HL7 gateways', roles: ['admin'] },
  { href: '/account', label: 'My account', roles: [...CLINICAL_ROLES, 'admin'] },
];

export function navFor(role: Role): NavItem[] {
  return NAV_ITEMS.filter((item) => item.roles.includes(role));
}

export function hasRole(role: Role | undefined, allowed: readonly Role[]): boolean {
  return role !== undefined && allowed.includes(role);
}
