import { z } from 'zod';
import { endpoint, json, parseParams, requireRole } from '~/lib/server/http.ts';
import { sendPasswordLink } from '~/lib/server/staff.ts';

const paramsSchema = z.object({ id: z.coerce.number().int().positive() });

export const POST = endpoint(async ({ locals, params }) => {
  const admin = requireRole(locals, ['admin']);
  const { id } = parseParams(params, paramsSchema);
  return json(await sendPasswordLink(admin.id, id));
});
