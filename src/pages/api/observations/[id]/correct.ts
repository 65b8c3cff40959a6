import { CHARTING_ROLES } from '~/lib/auth/roles.ts';
import { idParam } from '~/lib/charting/patient-input.ts';
import { correctionSchema } from '~/lib/charting/obs-input.ts';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';
import { correctObservation } from '~/lib/server/charting/observations.ts';

export const POST = endpoint(async ({ locals, params, request }) => {
  const user = requireRole(locals, CHARTING_ROLES);
  const { id } = parseParams(params, idParam);
  const now = new Date();
  const { reason, obs } = await parseBody(request, correctionSchema(now));
  return json({ observation: await correctObservation(user, id, reason, obs, now) }, 201);
});
