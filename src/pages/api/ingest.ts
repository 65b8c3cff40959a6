import { authenticateDeviceKey, deviceKeySource } from '~/lib/server/devices/keys.ts';
import { BatchRefused, ingestReadings } from '~/lib/server/devices/ingest.ts';
import { ApiError, endpoint, json, parseBody } from '~/lib/server/http.ts';
import { z } from 'zod';

// Public to the session middleware: the device key, not a user, authenticates the gateway.
export const POST = endpoint(async ({ request }) => {
  const key = await authenticateDeviceKey(request.headers.get('authorization'));
  const now = new Date();
  // Only the JSON is read here; the shared ingest path validates it (the same for HL7 v2).
  const body = await parseBody(request, z.unknown());
  try {
    return json(await ingestReadings(deviceKeySource(key), body, now));
  } catch (err) {
    if (err instanceof BatchRefused) throw new ApiError(400, 'invalid_input', err.message, err.fields);
    throw err;
  }
});
