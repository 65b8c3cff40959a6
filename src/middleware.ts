import { defineMiddleware } from 'astro:middleware';
import { hasRole } from './lib/auth/roles.ts';
import { allowedBeforePasswordChange, isPublicPath, pageRolesFor } from './lib/auth/page-access.ts';
import { findActiveSessionUser } from './lib/server/queries/users.ts';
import { errorJson } from './lib/server/http.ts';
import { sessionUserId } from './lib/server/session.ts';
import { startBackgroundWork } from './lib/server/background.ts';

// The escalation sweep and mail outbox run in every app process (claimed row by row in MariaDB).
startBackgroundWork();

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

// The one place the session is read: into Astro.locals for every page and endpoint.
export const onRequest = defineMiddleware(async (ctx, next) => {
  const path = ctx.url.pathname;
  const isApi = path.startsWith('/api/');
  ctx.locals.night = ctx.cookies.get('ebb-theme')?.value === 'night';

  // Astro checks Origin on form posts only; JSON posts are checked here (a cross-site page
  // could otherwise ride the session cookie).
  if (isApi && !SAFE_METHODS.has(ctx.request.method) && !path.startsWith('/api/auth/')) {
    const origin = ctx.request.headers.get('origin');
    if (origin && origin !== ctx.url.origin) return errorJson(403, 'cross_origin', 'Requests from another site are refused.');
  }

  // Auth.js's own routes, static assets and the load balancer's health check need no user.
  if (path.startsWith('/api/auth/') || path.startsWith('/_astro/') || path === '/api/health') return next();

  // The user is read from the database on every request, so a deactivated account stops at once.
  const id = await sessionUserId((name) => ctx.cookies.get(name)?.value);
  if (id !== null) ctx.locals.user = await findActiveSessionUser(id);

  if (isPublicPath(path)) return next();

  const user = ctx.locals.user;
  if (!user) {
    if (isApi) return errorJson(401, 'unauthenticated', 'Sign in first.');
    return ctx.redirect(`/signin?callbackUrl=${encodeURIComponent(path + ctx.url.search)}`);
  }
  // New accounts and admin resets: nothing but My account until a new password is chosen.
  if (user.mustChangePassword && !allowedBeforePasswordChange(path)) {
    if (isApi) return errorJson(403, 'password_change_required', 'Choose a new password on My account first.');
    return ctx.redirect('/account?required=1');
  }
  if (!isApi) {
    const roles = pageRolesFor(path);
    if (roles && !hasRole(user.role, roles)) {
      const page = await ctx.rewrite('/forbidden');
      return new Response(page.body, { status: 403, headers: page.headers });
    }
  }
  return next();
});
