import { z } from 'zod';
import { ApiError, endpoint, json, parseParams, requireRole } from '~/lib/server/http.ts';
import { unlockAccount } from '~/lib/server/accounts.ts';

const paramsSchema = z.object({ id: z.coerce.number().int().positive() });

export const POST = endpoint(async ({ locals, params }) => {
  const admin = requireRole(locals, ['admin']);
  const { id } = parseParams(params, paramsSchema);
  const done = await unlockAccount(admin.id, id);
  if (!done) throw new ApiError(404, 'not_found', 'No user with that id.');
  return json({ unlocked: true });
});
