import { endpoint, json, requireRole } from '~/lib/server/http.ts';
import { listUsers } from '~/lib/server/queries/users.ts';

export const GET = endpoint(async ({ locals }) => {
  requireRole(locals, ['admin']);
  return json({ users: await listUsers() });
});
