import { ZodError } from 'zod';
import { ingestBatchSchema } from '~/lib/imports/reading.ts';
import { authenticateDeviceKey } from '~/lib/server/devices/keys.ts';
import { ingestBatch } from '~/lib/server/devices/ingest.ts';
import { ApiError, endpoint, json, parseBody, zodFields } from '~/lib/server/http.ts';

/** A batch of 3,600 bad readings would otherwise answer with 3,600 reasons; the first ones say enough. */
const MAX_FIELDS = 100;

// Public to the session middleware: the device key, not a user, authenticates the gateway.
export const POST = endpoint(async ({ request }) => {
  const key = await authenticateDeviceKey(request.headers.get('authorization'));
  const now = new Date();
  let batch;
  try {
    batch = await parseBody(request, ingestBatchSchema(now));
  } catch (err) {
    if (!(err instanceof ZodError)) throw err;
    const fields = zodFields(new ZodError(err.issues.slice(0, MAX_FIELDS)));
    const [firstField, firstReason] = Object.entries(fields)[0]!;
    const more = err.issues.length > MAX_FIELDS ? ` (the first ${MAX_FIELDS} are listed)` : '';
    throw new ApiError(400, 'invalid_input', `${err.issues.length} problem(s) in the batch${more}; nothing was stored. First: ${firstField}: ${firstReason}`, fields);
  }
  return json(await ingestBatch(key, batch, now));
});
