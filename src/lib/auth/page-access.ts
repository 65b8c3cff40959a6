import { CLINICAL_ROLES, REPORT_ROLES, type Role } from './roles.ts';

/**
 * Which roles may open which pages, checked by the middleware on the server for every page
 * request. First match wins; a page not listed needs only a signed-in user.
 */
const PAGE_RULES: { prefix: string; roles: readonly Role[] }[] = [
  { prefix: '/admin', roles: ['admin'] },
  { prefix: '/patients', roles: CLINICAL_ROLES },
  { prefix: '/pleth', roles: CLINICAL_ROLES },
  { prefix: '/board', roles: CLINICAL_ROLES },
  { prefix: '/escalations', roles: CLINICAL_ROLES },
  { prefix: '/handover', roles: CLINICAL_ROLES },
  { prefix: '/reports', roles: REPORT_ROLES },
];

// /api/ingest is authenticated by the device key in the endpoint, not by a session.
// /set-password and its API are authorised by the single-use token in the link.
export const PUBLIC_PATHS = [
  '/signin',
  '/api/health',
  '/api/theme',
  '/forbidden',
  '/api/ingest',
  '/set-password',
  '/api/account/password-link',
];

/** What a person who must choose a new password may still reach (everything else waits). */
const PASSWORD_CHANGE_PATHS = ['/account', '/api/account/password', '/api/me', '/api/theme'];

export function allowedBeforePasswordChange(path: string): boolean {
  return PASSWORD_CHANGE_PATHS.includes(path);
}

export function isPublicPath(path: string): boolean {
  return (
    PUBLIC_PATHS.includes(path) ||
    path.startsWith('/api/auth/') ||
    path.startsWith('/_astro/') ||
    path === '/favicon.svg'
  );
}

export function pageRolesFor(path: string): readonly Role[] | null {
  return PAGE_RULES.find((rule) => path === rule.prefix || path.startsWith(`${rule.prefix}/`))?.roles ?? null;
}
