import { z } from 'zod';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';
import { retireBedSchema } from '~/lib/staff/inputs.ts';
import { retireBed } from '~/lib/server/units-admin.ts';

const paramsSchema = z.object({ code: z.string().min(1).max(16), bedId: z.coerce.number().int().positive() });

export const POST = endpoint(async ({ locals, params, request }) => {
  const admin = requireRole(locals, ['admin']);
  const { code, bedId } = parseParams(params, paramsSchema);
  const { reason } = await parseBody(request, retireBedSchema);
  return json(await retireBed(admin.id, code, bedId, reason));
});
