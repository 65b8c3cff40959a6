/**
 * Headers every response carries. HTML pages carry Astro's own Content-Security-Policy
 * (experimental.csp in astro.config.mjs: hashes of its scripts and styles, nothing from elsewhere),
 * to which frame-ancestors is added; everything that is not a page gets a policy allowing nothing.
 */
const COMMON: Record<string, string> = {
  'x-content-type-options': 'nosniff',
  'x-frame-options': 'DENY',
  // Not no-referrer: with it Chromium sends `Origin: null` on same-site form posts, which the origin checks refuse.
  'referrer-policy': 'same-origin',
  'permissions-policy': 'camera=(), microphone=(), geolocation=(), payment=(), usb=(), interest-cohort=()',
  'cross-origin-opener-policy': 'same-origin',
  'cross-origin-resource-policy': 'same-origin',
};

export const PAGE_CSP = "frame-ancestors 'none'; base-uri 'self'; form-action 'self'; object-src 'none'";
export const NON_PAGE_CSP = "default-src 'none'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'";

/**
 * Astro's policy plus framing, and style *attributes* allowed: server-rendered islands (charts sized
 * by style attributes in their first paint) would otherwise hydrate at zero size. Scripts and style
 * elements stay hash-only; Astro's config cannot name style-src-attr, so it is added here.
 */
function withPageAdditions(astroCsp: string): string {
  let csp = astroCsp.replace(/;\s*$/, '');
  if (!/frame-ancestors/.test(csp)) csp += "; frame-ancestors 'none'";
  if (!/style-src-attr/.test(csp)) csp += "; style-src-attr 'unsafe-inline'";
  return csp;
}

export function securityHeadersFor(
  path: string,
  contentType: string | null,
  astroCsp: string | null = null,
): Record<string, string> {
  const html = (contentType ?? '').includes('text/html');
  // Astro sends its policy (with the hashes) as a header on server-rendered pages: keep it, add framing.
  const csp = astroCsp ? withPageAdditions(astroCsp) : html ? PAGE_CSP : NON_PAGE_CSP;
  const headers: Record<string, string> = { ...COMMON, 'content-security-policy': csp };
  // Pages carry names and MRNs: never kept by a shared computer's cache. Hashed build assets may be.
  if (!path.startsWith('/_astro/') && !path.startsWith('/fonts/')) headers['cache-control'] = 'no-store';
  return headers;
}

/** Sets headers on a response, copying it first when its headers are immutable (redirects, fetched responses). */
export function withHeaders(res: Response, headers: Record<string, string>): Response {
  try {
    for (const [k, v] of Object.entries(headers)) res.headers.set(k, v);
    return res;
  } catch {
    const copy = new Response(res.body, { status: res.status, statusText: res.statusText, headers: res.headers });
    for (const [k, v] of Object.entries(headers)) copy.headers.set(k, v);
    // Astro keeps the cookies set through Astro.cookies on the response object itself: carry them over.
    for (const sym of Object.getOwnPropertySymbols(res))
      (copy as unknown as Record<symbol, unknown>)[sym] = (res as unknown as Record<symbol, unknown>)[sym];
    return copy;
  }
}
