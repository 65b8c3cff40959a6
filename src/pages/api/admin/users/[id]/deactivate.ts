import { z } from 'zod';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';
import { deactivateSchema } from '~/lib/staff/inputs.ts';
import { deactivateStaff } from '~/lib/server/staff.ts';

const paramsSchema = z.object({ id: z.coerce.number().int().positive() });

export const POST = endpoint(async ({ locals, params, request }) => {
  const admin = requireRole(locals, ['admin']);
  const { id } = parseParams(params, paramsSchema);
  const { reason } = await parseBody(request, deactivateSchema);
  return json(await deactivateStaff(admin.id, id, reason));
});
