import { endpoint, json, requireRole } from '~/lib/server/http.ts';
import { unitNurses } from '~/lib/server/board/assignments.ts';

/** The charge nurse's unit's nurses, for assigning beds. */
export const GET = endpoint(async ({ locals }) => {
  const charge = requireRole(locals, ['charge']);
  return json({ nurses: await unitNurses(charge) });
});
