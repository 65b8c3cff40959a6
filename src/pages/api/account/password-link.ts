import { endpoint, json, parseBody } from '~/lib/server/http.ts';
import { linkPasswordSchema } from '~/lib/staff/password-input.ts';
import { setPasswordWithLink } from '~/lib/server/passwords.ts';

// Signed out: the single-use token from the e-mail is the authority (only its hash is stored).
export const POST = endpoint(async ({ request }) => {
  const { token, password } = await parseBody(request, linkPasswordSchema);
  const { email } = await setPasswordWithLink(token, password);
  return json({ set: true, email });
});
