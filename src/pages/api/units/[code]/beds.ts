import { z } from 'zod';
import { CLINICAL_ROLES } from '~/lib/auth/roles.ts';
import { endpoint, json, parseParams, requireRole } from '~/lib/server/http.ts';
import { unitBeds } from '~/lib/server/charting/patients.ts';

const params = z.object({ code: z.string().min(1).max(16) });

/** Beds of a unit with whether each is free: for admitting and moving patients. */
export const GET = endpoint(async ({ locals, params: raw }) => {
  const user = requireRole(locals, CLINICAL_ROLES);
  const { code } = parseParams(raw, params);
  return json(await unitBeds(user, code));
});
