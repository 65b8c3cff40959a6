/** Shared by preview and commit: the file is the body (text/csv); mapping and name ride in the query. */
import { z } from 'zod';
import { trendMappingSchema } from '~/lib/imports/mapping.ts';
import { MAX_TREND_FILE_BYTES } from '~/lib/imports/trend-csv.ts';
import { ApiError, parseQuery } from '~/lib/server/http.ts';
import { readUpload } from '~/lib/server/upload-body.ts';

const metaSchema = z.object({
  fileName: z
    .string({ required_error: 'Give the file name' })
    .trim()
    .min(1, 'Give the file name')
    .max(255, 'File name: 255 characters at most')
    .transform((s) => s.split(/[\\/]/).pop()!),
  expectHash: z
    .string()
    .regex(/^[0-9a-f]{64}$/, 'Not a file hash')
    .optional(),
});

export async function readTrendUpload(request: Request, url: URL) {
  if (!(request.headers.get('content-type') ?? '').startsWith('text/csv')) {
    throw new ApiError(415, 'unsupported_media_type', 'Send the trend file as the body with content-type text/csv.');
  }
  const q = Object.fromEntries(url.searchParams);
  const meta = parseQuery(url, metaSchema.passthrough());
  const mapping = trendMappingSchema.parse(q);
  const file = await readUpload(request, meta.fileName, MAX_TREND_FILE_BYTES);
  return { mapping, file, expectHash: meta.expectHash };
}
