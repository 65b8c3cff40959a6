import { describe, expect, it } from 'vitest';
import { hasRole, navFor, seesUnit, spansUnits } from './roles.ts';
import { isPublicPath, pageRolesFor } from './page-access.ts';

describe('roles', () => {
  it('gives admin no clinical navigation and clinicians no admin navigation', () => {
    expect(navFor('admin').map((i) => i.href)).not.toContain('/');
    for (const role of ['nurse', 'charge', 'intensivist', 'outreach'] as const) {
      expect(navFor(role).some((i) => i.href.startsWith('/admin'))).toBe(false);
    }
  });
  it('lets intensivists and outreach span units, not nurses or charge nurses', () => {
    expect(spansUnits('intensivist')).toBe(true);
    expect(spansUnits('outreach')).toBe(true);
    expect(spansUnits('nurse')).toBe(false);
    expect(spansUnits('charge')).toBe(false);
  });
  it('lets a person see every unit, their own unit, or none (seesUnit)', () => {
    expect(seesUnit({ role: 'outreach', unitId: null }, 7)).toBe(true);
    expect(seesUnit({ role: 'intensivist', unitId: 3 }, 7)).toBe(true);
    expect(seesUnit({ role: 'nurse', unitId: 7 }, 7)).toBe(true);
    expect(seesUnit({ role: 'charge', unitId: 3 }, 7)).toBe(false);
    expect(seesUnit({ role: 'nurse', unitId: null }, 7)).toBe(false);
    expect(seesUnit({ role: 'admin', unitId: 7 }, 7)).toBe(false);
  });
  it('refuses an undefined role', () => {
    expect(hasRole(undefined, ['nurse'])).toBe(false);
  });
  it('keeps /admin pages for admins and leaves only sign-in and health public', () => {
    expect(pageRolesFor('/admin/users')).toEqual(['admin']);
    expect(pageRolesFor('/administrator')).toBeNull();
    expect(isPublicPath('/signin')).toBe(true);
    expect(isPublicPath('/api/health')).toBe(true);
    expect(isPublicPath('/api/me')).toBe(false);
    expect(isPublicPath('/')).toBe(false);
  });
});
