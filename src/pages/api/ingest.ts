import { ingestBatchSchema } from '../../lib/imports/reading.ts';
import { authenticateDeviceKey } from '../../lib/server/devices/keys.ts';
import { ingestBatch } from '../../lib/server/devices/ingest.ts';
import { endpoint, json, parseBody } from '../../lib/server/http.ts';

// Public to the session middleware: the device key, not a user, authenticates the gateway.
export const POST = endpoint(async ({ request }) => {
  const key = await authenticateDeviceKey(request.headers.get('authorization'));
  const now = new Date();
  const batch = await parseBody(request, ingestBatchSchema(now));
  return json(await ingestBatch(key, batch, now));
});
