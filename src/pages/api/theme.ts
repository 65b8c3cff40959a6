import { z } from 'zod';
import { endpoint } from '~/lib/server/http.ts';

// Only same-site paths, so the toggle cannot be used to bounce a user to another site.
const formSchema = z.object({ back: z.string().regex(/^\/(?!\/)/, 'must be a path on this site').max(500).default('/') });

/** Night mode toggle: a cookie, so the server renders the right theme on the first paint. */
export const POST = endpoint(async ({ request, cookies, redirect }) => {
  const form = formSchema.parse(Object.fromEntries(await request.formData()));
  const night = cookies.get('ebb-theme')?.value !== 'night';
  cookies.set('ebb-theme', night ? 'night' : 'day', { path: '/', sameSite: 'lax', httpOnly: true, maxAge: 365 * 24 * 3600 });
  return redirect(form.back, 303);
});
