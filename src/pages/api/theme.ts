import { z } from 'zod';
import { safeLocalPath } from '~/lib/auth/redirect.ts';
import { endpoint, readBodyText } from '~/lib/server/http.ts';

// Only same-site paths, so the toggle cannot be used to bounce a user to another site.
const formSchema = z.object({
  back: z
    .string()
    .max(500)
    .default('/')
    .transform((b) => safeLocalPath(b)),
});

/** Night mode toggle: a cookie, so the server renders the right theme on the first paint. */
export const POST = endpoint(async ({ request, cookies, redirect }) => {
  const form = formSchema.parse(Object.fromEntries(new URLSearchParams(await readBodyText(request))));
  const night = cookies.get('ebb-theme')?.value !== 'night';
  cookies.set('ebb-theme', night ? 'night' : 'day', {
    path: '/',
    sameSite: 'lax',
    httpOnly: true,
    maxAge: 365 * 24 * 3600,
  });
  return redirect(form.back, 303);
});
