import { z } from 'zod';
import { CLINICAL_ROLES } from '~/lib/auth/roles.ts';
import { endpoint, json, parseQuery, requireRole } from '~/lib/server/http.ts';
import { unitBoard } from '~/lib/server/board/board.ts';

const query = z.object({ unit: z.string().trim().min(1).max(16).optional() });

export const GET = endpoint(async ({ locals, url }) => {
  const user = requireRole(locals, CLINICAL_ROLES);
  const { unit } = parseQuery(url, query);
  return json(await unitBoard(user, unit));
});
