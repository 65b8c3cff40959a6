/** Roles and what each may reach. Pure: used by the middleware, pages, endpoints and tests. */
export const ROLES = ['nurse', 'charge', 'intensivist', 'outreach', 'admin'] as const;
export type Role = (typeof ROLES)[number];

export const CLINICAL_ROLES: readonly Role[] = ['nurse', 'charge', 'intensivist', 'outreach'];

/** Who opens the unit report: charge nurses (their unit), intensivists and administrators (every unit). */
export const REPORT_ROLES: readonly Role[] = ['charge', 'intensivist', 'admin'];

// What each group may do, named once: routes (`requireRole`), services and pages read these, and the
// per-record answers the server sends (`can`) are built from them, so no island keeps its own copy.

/** Who charts at the bedside of their unit (obs and their corrections, trend files, handover notes) and is given beds to look after. */
export const CHARTING_ROLES: readonly Role[] = ['nurse', 'charge'];
/** Who orders a patient's target band. */
export const ORDERING_ROLES: readonly Role[] = ['intensivist'];
/** Who charts and corrects blood gases: those who chart at the bedside and those who order the band. */
export const GAS_CHARTING_ROLES: readonly Role[] = [...CHARTING_ROLES, ...ORDERING_ROLES];
/** Who corrects, or marks in error, an entry someone else made (obs, blood gases); the others correct their own. */
export const CORRECTING_OTHERS_ROLES: readonly Role[] = ['charge'];
/** Who admits, moves and discharges patients and assigns nurses to beds (in their own unit). */
export const BED_MANAGING_ROLES: readonly Role[] = ['charge'];
/** Who claims an escalation (to show the team it is being handled). */
export const CLAIMING_ROLES: readonly Role[] = ['nurse', 'charge', 'outreach'];
/** Who closes an escalation with its outcome. */
export const CLOSING_ROLES: readonly Role[] = ['charge', 'outreach'];
/** Who opens the hospital-wide report. */
export const HOSPITAL_REPORT_ROLES: readonly Role[] = ['intensivist', 'admin'];
/** Who reads a unit's escalation settings: administrators (every unit; only they change them) and charge nurses (their own). */
export const UNIT_SETTINGS_READING_ROLES: readonly Role[] = ['admin', 'charge'];

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

/**
 * The one rule for "may this person see this unit's patients, board, escalations and handover":
 * clinical roles only; those that span units see every unit, the others their own.
 * `unitsVisibleTo` (src/lib/server/units-visible.ts) lists units by it.
 */
export function seesUnit(user: { role: Role; unitId: number | null }, unitId: number): boolean {
  if (!hasRole(user.role, CLINICAL_ROLES)) return false;
  return spansUnits(user.role) || (user.unitId !== null && user.unitId === unitId);
}

export interface NavItem {
  href: string;
  label: string;
  roles: readonly Role[];
}

/** The navigation, by role. Add an entry when a screen lands; a role sees only what it may open. */
export const NAV_ITEMS: readonly NavItem[] = [
  { href: '/board', label: 'Ward board', roles: CLINICAL_ROLES },
  { href: '/', label: 'Units', roles: CLINICAL_ROLES },
  { href: '/patients', label: 'Patients', roles: CLINICAL_ROLES },
  { href: '/pleth', label: 'Strip check', roles: CLINICAL_ROLES },
  { href: '/escalations', label: 'Outreach queue', roles: CLINICAL_ROLES },
  { href: '/handover', label: 'Handover', roles: CLINICAL_ROLES },
  { href: '/reports', label: 'Unit report', roles: REPORT_ROLES },
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
