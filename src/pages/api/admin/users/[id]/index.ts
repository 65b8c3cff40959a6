import { z } from 'zod';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';
import { updateUserSchema } from '~/lib/staff/inputs.ts';
import { updateStaffMember } from '~/lib/server/staff.ts';

const paramsSchema = z.object({ id: z.coerce.number().int().positive() });

export const PATCH = endpoint(async ({ locals, params, request }) => {
  const admin = requireRole(locals, ['admin']);
  const { id } = parseParams(params, paramsSchema);
  const input = await parseBody(request, updateUserSchema);
  return json(await updateStaffMember(admin.id, id, input));
});
