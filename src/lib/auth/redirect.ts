/**
 * Where a user may be sent after sign-in or a theme toggle: a path on this site only. Browsers
 * read "\" as "/" and drop tabs and newlines inside URLs, so "/\evil.example" and "/<TAB>/evil.example"
 * both leave the site; anything with a backslash or a control character is refused outright.
 */
const BASE = 'http://ebbwatch.invalid';

export function safeLocalPath(raw: string | null | undefined, fallback = '/'): string {
  if (typeof raw !== 'string' || raw.length === 0 || raw.length > 500) return fallback;
  if (!raw.startsWith('/') || raw.startsWith('//')) return fallback;
  // biome-ignore lint/suspicious/noControlCharactersInRegex: refusing control characters is the point
  if (/[\\\u0000-\u001f\u007f\s]/.test(raw)) return fallback;
  try {
    const url = new URL(raw, BASE);
    if (url.origin !== BASE) return fallback;
    return url.pathname + url.search + url.hash;
  } catch {
    return fallback;
  }
}
