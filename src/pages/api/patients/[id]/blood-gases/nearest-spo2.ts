import { z } from 'zod';
import { CLINICAL_ROLES } from '~/lib/auth/roles.ts';
import { idParam } from '~/lib/charting/patient-input.ts';
import { endpoint, json, parseParams, parseQuery, requireRole } from '~/lib/server/http.ts';
import { nearestSpo2For } from '~/lib/server/bloodgas/blood-gases.ts';

const query = z.object({ at: z.coerce.date({ errorMap: () => ({ message: 'at must be a date and time' }) }) });

/** The nearest trusted SpO₂ within 2 min of a sample time, to prefill the pair (editable). */
export const GET = endpoint(async ({ locals, params, url }) => {
  const user = requireRole(locals, CLINICAL_ROLES);
  const { id } = parseParams(params, idParam);
  const { at } = parseQuery(url, query);
  return json({ nearest: await nearestSpo2For(user, id, at) });
});
