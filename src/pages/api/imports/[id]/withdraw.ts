import { CHARTING_ROLES } from '~/lib/auth/roles.ts';
import { z } from 'zod';
import { idParam } from '~/lib/charting/patient-input.ts';
import { endpoint, json, parseBody, parseParams, requireRole } from '~/lib/server/http.ts';
import { withdrawImport } from '~/lib/server/trend-files/imports.ts';

const withdrawSchema = z.object({
  reason: z
    .string({ required_error: 'Give the reason for withdrawing' })
    .trim()
    .min(3, 'Give the reason for withdrawing')
    .max(400, '400 characters at most'),
});

export const POST = endpoint(async ({ locals, params, request }) => {
  const user = requireRole(locals, CHARTING_ROLES);
  const { id } = parseParams(params, idParam);
  const { reason } = await parseBody(request, withdrawSchema);
  return json({ import: await withdrawImport(user, id, reason) });
});
