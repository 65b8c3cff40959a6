import { CHARTING_ROLES } from '~/lib/auth/roles.ts';
import { idParam } from '~/lib/charting/patient-input.ts';
import { endpoint, json, parseParams, requireRole } from '~/lib/server/http.ts';
import { previewTrend } from '~/lib/server/trend-files/imports.ts';
import { readTrendUpload } from '~/lib/server/trend-files/request.ts';

// Nothing is stored: the answer says what a commit of this file would store, skip and refuse.
export const POST = endpoint(async ({ locals, params, request, url }) => {
  const user = requireRole(locals, CHARTING_ROLES);
  const { id } = parseParams(params, idParam);
  const { mapping, file } = await readTrendUpload(request, url);
  return json({ preview: await previewTrend(user, id, file, mapping) });
});
