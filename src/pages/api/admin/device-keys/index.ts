import { z } from 'zod';
import { createDeviceKey, listKeys } from '~/lib/server/devices/keys.ts';
import { endpoint, json, parseBody, requireRole } from '~/lib/server/http.ts';

const createSchema = z.object({
  bedId: z.number({ required_error: 'Choose a bed', invalid_type_error: 'Choose a bed' }).int().positive(),
  label: z
    .string({ required_error: 'Name the gateway or monitor' })
    .trim()
    .min(2, 'Name the gateway or monitor')
    .max(80, '80 characters at most'),
});

export const GET = endpoint(async ({ locals }) => {
  requireRole(locals, ['admin']);
  return json(await listKeys());
});

// The key is in this answer and nowhere else, ever.
export const POST = endpoint(async ({ locals, request }) => {
  const user = requireRole(locals, ['admin']);
  const input = await parseBody(request, createSchema);
  return json(await createDeviceKey(user.id, input), 201);
});
