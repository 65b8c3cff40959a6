import { CLINICAL_ROLES } from '~/lib/auth/roles.ts';
import { endpoint, json, parseBody, requireRole } from '~/lib/server/http.ts';
import { changePasswordSchema } from '~/lib/staff/password-input.ts';
import { changeOwnPassword } from '~/lib/server/passwords.ts';

// Everyone signed in changes their own password.
export const POST = endpoint(async ({ locals, request }) => {
  const user = requireRole(locals, [...CLINICAL_ROLES, 'admin']);
  const { currentPassword, newPassword } = await parseBody(request, changePasswordSchema);
  await changeOwnPassword(user.id, currentPassword, newPassword);
  return json({ changed: true });
});
