import { endpoint, json, requireRole } from '~/lib/server/http.ts';
import { ROLES } from '~/lib/auth/roles.ts';

export const GET = endpoint(async ({ locals }) => {
  const user = requireRole(locals, ROLES);
  return json({
    email: user.email,
    name: user.name,
    role: user.role,
    unit: user.unitCode ? { code: user.unitCode, name: user.unitName } : null,
  });
});
