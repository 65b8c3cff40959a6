import { CHARTING_ROLES } from '~/lib/auth/roles.ts';
import { idParam } from '~/lib/charting/patient-input.ts';
import { endpoint, json, parseParams, requireRole } from '~/lib/server/http.ts';
import { commitTrend } from '~/lib/server/trend-files/imports.ts';
import { readTrendUpload } from '~/lib/server/trend-files/request.ts';

export const POST = endpoint(async ({ locals, params, request, url }) => {
  const user = requireRole(locals, CHARTING_ROLES);
  const { id } = parseParams(params, idParam);
  const { mapping, file, expectHash } = await readTrendUpload(request, url);
  return json(await commitTrend(user, id, file, mapping, expectHash), 201);
});
