import { defineMiddleware, sequence } from 'astro:middleware';
import { hasRole } from '~/lib/auth/roles.ts';
import { allowedBeforePasswordChange, isPublicPath, pageRolesFor } from '~/lib/auth/page-access.ts';
import { retryAfterSeconds } from '~/lib/auth/throttle.ts';
import { findActiveSessionUser } from '~/lib/server/queries/users.ts';
import { isDatabaseUnavailable } from '~/lib/server/queries/transaction.ts';
import { DATABASE_UNAVAILABLE_MESSAGE, errorJson } from '~/lib/server/http.ts';
import { readSessionCookie } from '~/lib/server/session.ts';
import { bodyLimitFor, streamsOwnBody } from '~/lib/server/body-limits.ts';
import { clientAddress, requestAddress, runWithRequestFacts } from '~/lib/server/request-context.ts';
import { signinBlockedFor } from '~/lib/server/throttle.ts';
import { securityHeadersFor, withHeaders } from '~/lib/server/security-headers.ts';
import { startBackgroundWork } from '~/lib/server/background.ts';

// The escalation sweep and mail outbox run in every app process (claimed row by row in MariaDB).
startBackgroundWork();

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);
const isApiPath = (path: string) => path === '/api' || path.startsWith('/api/');

/** The caller's address, for the sign-in audit and throttling, held for the length of the request. */
const requestFacts = defineMiddleware((ctx, next) => {
  let socket: string | null = null;
  try {
    socket = ctx.clientAddress;
  } catch {
    socket = null; // prerendered or adapter without an address
  }
  return runWithRequestFacts({ address: clientAddress(ctx.request.headers, socket) }, () => next());
});

/** CSP, framing, sniffing, referrer and permissions headers on every response; no caching of pages with patient data. */
const securityHeaders = defineMiddleware(async (ctx, next) => {
  const res = await next();
  return withHeaders(
    res,
    securityHeadersFor(ctx.url.pathname, res.headers.get('content-type'), res.headers.get('content-security-policy')),
  );
});

/** An unknown /api/* path answers in the JSON error shape, not with the HTML not-found page. */
const apiNotFound = defineMiddleware(async (ctx, next) => {
  const res = await next();
  if (isApiPath(ctx.url.pathname) && res.status === 404 && !(res.headers.get('content-type') ?? '').includes('json')) {
    return errorJson(404, 'not_found', `There is no API route ${ctx.url.pathname}.`);
  }
  return res;
});

const UNAVAILABLE_PAGE = `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Ebbwatch: database unavailable</title></head>
<body><h1>The database is not answering</h1><p>Readings cannot be charted or shown until it is back. This page does not refresh itself: try again in a minute, and follow the unit's downtime procedure meanwhile.</p></body></html>`;

/** MariaDB down: 503 in the JSON error shape for the API, a plain page for pages; the app recovers by itself. */
const databaseFaults = defineMiddleware(async (ctx, next) => {
  try {
    return await next();
  } catch (err) {
    if (!isDatabaseUnavailable(err)) throw err;
    console.error('[db] unavailable:', (err as Error).message);
    if (isApiPath(ctx.url.pathname)) return errorJson(503, 'database_unavailable', DATABASE_UNAVAILABLE_MESSAGE);
    return new Response(UNAVAILABLE_PAGE, {
      status: 503,
      headers: { 'content-type': 'text/html; charset=utf-8', 'retry-after': '30' },
    });
  }
});

/** 413 before anything parses a body larger than the route takes; 411 when a capped body gives no length. */
const bodyCap = defineMiddleware((ctx, next) => {
  if (SAFE_METHODS.has(ctx.request.method) || !ctx.request.body) return next();
  const path = ctx.url.pathname;
  // Uploads cap themselves while reading (their reader stops at the same limit): answering 413 here and
  // closing the socket mid-upload made clients fail with EPIPE instead of reading the 413.
  if (streamsOwnBody(path)) return next();
  const limit = bodyLimitFor(path);
  const declared = ctx.request.headers.get('content-length');
  if (declared === null) {
    // No length and no chunked encoding: HTTP says there is no body (a browser's bodiless DELETE).
    if (!ctx.request.headers.has('transfer-encoding')) return next();
    return errorJson(411, 'length_required', 'Send a Content-Length with the body.');
  }
  if (!/^\d+$/.test(declared) || Number(declared) > limit) {
    const res = errorJson(
      413,
      'body_too_large',
      `The body is larger than this route takes (${Math.round(limit / 1024)} KB).`,
    );
    // The unread body is still arriving: close the connection rather than let a client reuse it.
    res.headers.set('connection', 'close');
    return res;
  }
  return next();
});

/**
 * State-changing API calls must come from this site: Origin equal to ours. Astro checks form posts
 * only, and a JSON write with no Origin at all (or Sec-Fetch-Site: cross-site) is refused too.
 * Auth.js's own routes carry its CSRF token; the device feed uses a bearer key, never a cookie.
 */
const originCheck = defineMiddleware((ctx, next) => {
  const path = ctx.url.pathname;
  if (SAFE_METHODS.has(ctx.request.method) || !isApiPath(path) || path.startsWith('/api/auth/')) return next();
  const origin = ctx.request.headers.get('origin');
  const site = ctx.request.headers.get('sec-fetch-site');
  // The device feed has no cookie to ride and gateways send no Origin; a browser page calling it still may not.
  if (path === '/api/ingest' && origin === null && (site === null || site === 'same-origin' || site === 'none'))
    return next();
  if (origin !== ctx.url.origin || (site !== null && site !== 'same-origin')) {
    return errorJson(
      403,
      'cross_origin',
      origin === null ? 'Requests without an Origin header are refused.' : 'Requests from another site are refused.',
    );
  }
  return next();
});

/** The one place the session is read: cookie → session record → active user, into Astro.locals. */
const session = defineMiddleware(async (ctx, next) => {
  const path = ctx.url.pathname;
  ctx.locals.night = ctx.cookies.get('ebb-theme')?.value === 'night';
  // Auth.js's own routes, static assets and the load balancer's health check need no user.
  if (path.startsWith('/api/auth/') || path.startsWith('/_astro/') || path === '/api/health') return next();
  const ref = await readSessionCookie((name) => ctx.cookies.get(name)?.value);
  // Read from the database on every request, so sign-out, deactivation and password changes stop it at once.
  if (ref) ctx.locals.user = await findActiveSessionUser(ref.uid, ref.sid);
  return next();
});

/** Too many failed sign-ins from this address or for this account: 429 with Retry-After, before any password check. */
const signinThrottle = defineMiddleware(async (ctx, next) => {
  if (ctx.request.method !== 'POST' || ctx.url.pathname !== '/api/auth/callback/credentials') return next();
  let email: string | null = null;
  try {
    const form = await ctx.request.clone().formData();
    const raw = form.get('email');
    email = typeof raw === 'string' ? raw : null;
  } catch {
    email = null;
  }
  const waitMs = await signinBlockedFor(requestAddress(), email);
  if (waitMs <= 0) return next();
  const seconds = retryAfterSeconds(waitMs);
  const res = errorJson(
    429,
    'too_many_signins',
    `Too many failed sign-ins; try again in ${Math.ceil(seconds / 60)} min.`,
  );
  // Auth.js's browser client follows `url`; send it back to the sign-in page with the reason.
  const body = { ...(await res.json()), url: `/signin?code=throttled&retry=${seconds}` };
  return new Response(JSON.stringify(body), {
    status: 429,
    headers: {
      'content-type': 'application/json; charset=utf-8',
      'cache-control': 'no-store',
      'retry-after': String(seconds),
    },
  });
});

/** Signed out → 401 (API) or the sign-in page; wrong role for a page → 403. API roles are checked by each endpoint. */
const access = defineMiddleware(async (ctx, next) => {
  const path = ctx.url.pathname;
  if (isPublicPath(path)) return next();
  const user = ctx.locals.user;
  if (!user) {
    if (isApiPath(path)) return errorJson(401, 'unauthenticated', 'Sign in first.');
    return ctx.redirect(`/signin?callbackUrl=${encodeURIComponent(path + ctx.url.search)}`);
  }
  // New accounts and admin resets: nothing but My account until a new password is chosen.
  if (user.mustChangePassword && !allowedBeforePasswordChange(path)) {
    if (isApiPath(path))
      return errorJson(403, 'password_change_required', 'Choose a new password on My account first.');
    return ctx.redirect('/account?required=1');
  }
  if (!isApiPath(path)) {
    const roles = pageRolesFor(path);
    if (roles && !hasRole(user.role, roles)) {
      const page = await ctx.rewrite('/forbidden');
      return new Response(page.body, { status: 403, headers: page.headers });
    }
  }
  return next();
});

export const onRequest = sequence(
  requestFacts,
  securityHeaders,
  apiNotFound,
  databaseFaults,
  bodyCap,
  originCheck,
  session,
  signinThrottle,
  access,
);
