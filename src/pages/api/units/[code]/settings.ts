import { UNIT_SETTINGS_READING_ROLES } from '~/lib/auth/roles.ts';
import { z } from 'zod';
import { unitSettingsSchema } from '~/lib/escalations/inputs.ts';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';
import { readUnitSettings, writeUnitSettings } from '~/lib/server/escalations/service.ts';

const params = z.object({ code: z.string().min(1).max(16) });

export const GET = endpoint(async ({ locals, params: raw }) => {
  const user = requireRole(locals, UNIT_SETTINGS_READING_ROLES);
  const { code } = parseParams(raw, params);
  return json(await readUnitSettings(user, code));
});

export const PUT = endpoint(async ({ locals, params: raw, request }) => {
  const admin = requireRole(locals, ['admin']);
  const { code } = parseParams(raw, params);
  const input = await parseBody(request, unitSettingsSchema);
  return json(await writeUnitSettings(admin, code, input));
});
