import { z } from 'zod';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';
import { updateUnitSchema } from '~/lib/staff/inputs.ts';
import { renameUnit } from '~/lib/server/units-admin.ts';

const paramsSchema = z.object({ code: z.string().min(1).max(16) });

export const PATCH = endpoint(async ({ locals, params, request }) => {
  const admin = requireRole(locals, ['admin']);
  const { code } = parseParams(params, paramsSchema);
  const input = await parseBody(request, updateUnitSchema);
  return json(await renameUnit(admin.id, code, input));
});
