/** Reads a raw request body up to a size limit (the trend file or strip itself, not JSON). */
import { createHash } from 'node:crypto';
import { ApiError, readBodyBytes } from '~/lib/server/http.ts';

export interface UploadedFile {
  name: string;
  bytes: Buffer;
  hash: string;
  text: string;
}

export async function readUpload(request: Request, name: string, maxBytes: number): Promise<UploadedFile> {
  const declared = Number(request.headers.get('content-length') ?? NaN);
  const mb = `${Math.round(maxBytes / 1024 / 1024)} MB`;
  if (declared > maxBytes) throw new ApiError(413, 'file_too_large', `The file is larger than ${mb}.`);
  if (!request.body)
    throw new ApiError(400, 'invalid_input', 'Send the file as the request body.', { file: 'No file' });
  const bytes = await readBodyBytes(
    request.body,
    maxBytes,
    () => new ApiError(413, 'file_too_large', `The file is larger than ${mb}.`),
  );
  if (bytes.byteLength === 0) throw new ApiError(400, 'invalid_input', 'The file is empty.', { file: 'Empty file' });
  const text = new TextDecoder('utf-8', { fatal: false }).decode(bytes);
  return { name, bytes, hash: createHash('sha256').update(bytes).digest('hex'), text };
}
