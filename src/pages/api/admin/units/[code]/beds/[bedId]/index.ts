import { z } from 'zod';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';
import { renameBedSchema } from '~/lib/staff/inputs.ts';
import { renameBed } from '~/lib/server/units-admin.ts';

const paramsSchema = z.object({ code: z.string().min(1).max(16), bedId: z.coerce.number().int().positive() });

export const PATCH = endpoint(async ({ locals, params, request }) => {
  const admin = requireRole(locals, ['admin']);
  const { code, bedId } = parseParams(params, paramsSchema);
  const { label } = await parseBody(request, renameBedSchema);
  return json(await renameBed(admin.id, code, bedId, label));
});
