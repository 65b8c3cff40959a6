import { CHARTING_ROLES } from '~/lib/auth/roles.ts';
import { idParam } from '~/lib/charting/patient-input.ts';
import { enteredInErrorSchema } from '~/lib/charting/obs-input.ts';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';
import { markEnteredInError } from '~/lib/server/charting/observations.ts';

export const POST = endpoint(async ({ locals, params, request }) => {
  const user = requireRole(locals, CHARTING_ROLES);
  const { id } = parseParams(params, idParam);
  const { reason } = await parseBody(request, enteredInErrorSchema);
  return json({ observation: await markEnteredInError(user, id, reason) });
});
