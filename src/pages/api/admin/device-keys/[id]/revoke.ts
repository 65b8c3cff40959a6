import { z } from 'zod';
import { idParam } from '~/lib/charting/patient-input.ts';
import { revokeKey } from '~/lib/server/devices/keys.ts';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';

const revokeSchema = z.object({
  reason: z.string({ required_error: 'Give the reason' }).trim().min(3, 'Give the reason').max(200),
});

export const POST = endpoint(async ({ locals, params, request }) => {
  const user = requireRole(locals, ['admin']);
  const { id } = parseParams(params, idParam);
  const { reason } = await parseBody(request, revokeSchema);
  return json({ deviceKey: await revokeKey(user.id, id, reason) });
});
