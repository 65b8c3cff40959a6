import { BED_MANAGING_ROLES } from '~/lib/auth/roles.ts';
import { endpoint, json, requireRole } from '~/lib/server/http.ts';
import { unitNurses } from '~/lib/server/board/assignments.ts';

/** The charge nurse's unit's nurses, for assigning beds. */
export const GET = endpoint(async ({ locals }) => {
  const charge = requireRole(locals, BED_MANAGING_ROLES);
  return json({ nurses: await unitNurses(charge) });
});
