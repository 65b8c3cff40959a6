import { endpoint, json, parseBody, requireRole } from '~/lib/server/http.ts';
import { listUsers } from '~/lib/server/queries/users.ts';
import { createUserSchema } from '~/lib/staff/inputs.ts';
import { createStaff } from '~/lib/server/staff.ts';

export const GET = endpoint(async ({ locals }) => {
  requireRole(locals, ['admin']);
  return json({ users: await listUsers() });
});

export const POST = endpoint(async ({ locals, request }) => {
  const admin = requireRole(locals, ['admin']);
  const input = await parseBody(request, createUserSchema);
  return json(await createStaff(admin.id, input), 201);
});
